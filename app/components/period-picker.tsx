// Which twelve months a verdict judges, said on the page, and a picker for another period.
import { Form } from "react-router";
import { monthLabel } from "~/domain/season/period";

export function PeriodPicker({
  chosen,
  months,
  keep,
  problem,
}: {
  /** "latest" or the chosen period's last month. */
  chosen: string;
  /** Months offered as a period's last month, newest first. */
  months: string[];
  /** Other search params the page keeps (e.g. the plant laid over the year strip). */
  keep?: Record<string, string | undefined>;
  problem?: string | null;
}) {
  return (
    <Form method="get" className="flex flex-wrap items-center gap-2 text-sm" data-testid="period-picker">
      {Object.entries(keep ?? {}).map(([k, v]) => (v ? <input key={k} type="hidden" name={k} value={v} /> : null))}
      <label htmlFor="period">Judge on:</label>
      <select
        key={chosen}
        id="period"
        name="period"
        className="field w-auto max-w-full"
        defaultValue={chosen}
        onChange={(e) => e.currentTarget.form?.requestSubmit()}
      >
        <option value="latest">the latest 12 months with readings</option>
        {months.map((m) => (
          <option key={m} value={m}>
            the 12 months to {monthLabel(m)}
          </option>
        ))}
      </select>
      <noscript>
        <button className="btn-quiet">Show</button>
      </noscript>
      {problem ? (
        <p className="error w-full" role="alert">
          {problem}
        </p>
      ) : null}
    </Form>
  );
}
