import { getInputProps, getSelectProps, getTextareaProps, type FieldMetadata } from "@conform-to/react";

type Meta = FieldMetadata<unknown, Record<string, unknown>, string[]>;

export function FieldError({ meta }: { meta: Meta }) {
  return meta.errors?.length ? (
    <p id={meta.errorId} className="error" role="alert">
      {meta.errors.join(" ")}
    </p>
  ) : null;
}

export function TextField({
  meta,
  label,
  hint,
  type = "text",
  inlineError = true,
  ...rest
}: {
  meta: Meta;
  label: string;
  hint?: React.ReactNode;
  type?: "text" | "email" | "password" | "number" | "datetime-local" | "date";
  /** false where the form lists its fields' errors under a row of fields. */
  inlineError?: boolean;
} & Omit<React.InputHTMLAttributes<HTMLInputElement>, "type">) {
  return (
    <div>
      <label htmlFor={meta.id} className="label">
        {label}
      </label>
      <input
        className="field"
        {...getInputProps(meta, { type, ariaDescribedBy: hint ? `${meta.id}-hint` : undefined })}
        {...rest}
      />
      {hint ? (
        <p id={`${meta.id}-hint`} className="hint">
          {hint}
        </p>
      ) : null}
      {inlineError ? <FieldError meta={meta} /> : null}
    </div>
  );
}

export function SelectField({
  meta,
  label,
  hint,
  options,
  inlineError = true,
}: {
  meta: Meta;
  label: string;
  hint?: React.ReactNode;
  options: { value: string; label: string }[];
  /** false where the form lists its fields' errors under a row of fields. */
  inlineError?: boolean;
}) {
  return (
    <div>
      <label htmlFor={meta.id} className="label">
        {label}
      </label>
      <select className="field" {...getSelectProps(meta)}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {hint ? <p className="hint">{hint}</p> : null}
      {inlineError ? <FieldError meta={meta} /> : null}
    </div>
  );
}

/** A required choice (a spot, a sensor) that starts unchosen, showing its placeholder. */
export function ChoiceSelect({
  id,
  name,
  choices,
  placeholder = "Choose…",
  className = "field",
}: {
  id: string;
  name: string;
  choices: { id: number; name: string }[];
  placeholder?: string;
  className?: string;
}) {
  return (
    <select id={id} name={name} className={className} required defaultValue="">
      <option value="" disabled>
        {placeholder}
      </option>
      {choices.map((c) => (
        <option key={c.id} value={c.id}>
          {c.name}
        </option>
      ))}
    </select>
  );
}

export function TextAreaField({ meta, label, hint }: { meta: Meta; label: string; hint?: React.ReactNode }) {
  return (
    <div>
      <label htmlFor={meta.id} className="label">
        {label}
      </label>
      <textarea className="field min-h-24" {...getTextareaProps(meta)} />
      {hint ? <p className="hint">{hint}</p> : null}
      <FieldError meta={meta} />
    </div>
  );
}

export function FormErrors({ errors }: { errors?: string[] }) {
  return errors?.length ? (
    <div
      role="alert"
      className="rounded-[0.2rem] border border-l-4 border-poor/30 border-l-poor bg-card px-3 py-2 text-sm font-medium text-poor"
    >
      {errors.join(" ")}
    </div>
  ) : null;
}
