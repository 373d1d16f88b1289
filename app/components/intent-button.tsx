// A form of one button that posts an intent with the ids it acts on (remove, withdraw …), asking
// first when a mistake would lose something the grower cannot simply add back.
import { Form } from "react-router";

export function IntentButton({
  intent,
  fields,
  className,
  busy,
  ask,
  label,
  children,
}: {
  intent: string;
  /** Hidden fields sent with the intent, such as the row's id. */
  fields: Record<string, string | number>;
  className: string;
  busy: boolean;
  /** A question the browser asks before posting; the post is dropped when the grower says no. */
  ask?: string;
  /** The button's accessible name, when its text alone does not say what it acts on. */
  label?: string;
  children: React.ReactNode;
}) {
  return (
    <Form
      method="post"
      onSubmit={
        ask
          ? (e) => {
              if (!confirm(ask)) e.preventDefault();
            }
          : undefined
      }
    >
      <input type="hidden" name="intent" value={intent} />
      {Object.entries(fields).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <button className={className} disabled={busy} aria-label={label}>
        {children}
      </button>
    </Form>
  );
}
