// The form that logs a water check: source (a standard one or the grower's own name), date, a TDS or
// EC reading with the meter's scale, and a pH. It clears itself once a check is saved.
import { useEffect, useRef } from "react";
import {
  getCollectionProps,
  getFormProps,
  getInputProps,
  getSelectProps,
  useForm,
  type SubmissionResult,
} from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form } from "react-router";
import { FieldError, FormErrors, SelectField, TextField } from "~/components/field";
import { MEASURES, waterCheckSchema } from "~/forms/water";
import { sourceName, STANDARD_SOURCES } from "~/domain/water/logged-check";

const SCALE_OPTIONS = [
  { value: "", label: "Not sure" },
  { value: "0.5", label: "0.5 — NaCl scale (ppm = µS/cm × 0.5)" },
  { value: "0.7", label: "0.7 — 442 scale (ppm = µS/cm × 0.7)" },
];

export function WaterCheckForm({
  today,
  ownSources,
  lastResult,
  saved,
  busy,
}: {
  /** The site's local date, YYYY-MM-DD: the default and the latest date allowed. */
  today: string;
  /** The grower's own source names so far, offered as they type. */
  ownSources: string[];
  /** The server's answer to a refused check, with what was typed. */
  lastResult?: SubmissionResult<string[]>;
  /** The action's answer when it saved a check: each new one clears the form. */
  saved?: object;
  busy: boolean;
}) {
  const [logForm, logFields] = useForm({
    id: "water-check",
    lastResult,
    defaultValue: { source: "tap", checkedOn: today, measure: "ppm" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: waterCheckSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  const formRef = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (saved) formRef.current?.reset();
  }, [saved]);

  return (
    <section className="card">
      <h3 className="h2 mb-3">Log a check</h3>
      <Form method="post" className="space-y-3" ref={formRef} {...getFormProps(logForm)}>
        <input type="hidden" name="intent" value="log" />
        <div>
          <label className="label" htmlFor={logFields.source.id}>
            Source
          </label>
          <select className="field" {...getSelectProps(logFields.source)}>
            {STANDARD_SOURCES.map((s) => (
              <option key={s} value={s}>
                {sourceName(s)}
              </option>
            ))}
            <option value="other">Another source (name it)</option>
          </select>
        </div>
        <div>
          <label className="label" htmlFor={logFields.ownSource.id}>
            Its name, for another source
          </label>
          <input
            className="field"
            list="own-sources"
            maxLength={40}
            placeholder="e.g. Water butt, RO unit"
            {...getInputProps(logFields.ownSource, { type: "text" })}
          />
          <datalist id="own-sources">
            {ownSources.map((s) => (
              <option key={s} value={s} />
            ))}
          </datalist>
          <FieldError meta={logFields.ownSource} />
        </div>
        <TextField meta={logFields.checkedOn} label="Date" type="date" max={today} required />
        <fieldset>
          <legend className="label">The meter reads</legend>
          <div className="flex flex-wrap gap-4 text-sm">
            {getCollectionProps(logFields.measure, { type: "radio", options: [...MEASURES] }).map(
              ({ key, ...props }) => (
                <label key={key} className="flex items-center gap-2">
                  <input {...props} /> {props.value === "ec" ? "EC in µS/cm" : "TDS in ppm"}
                </label>
              ),
            )}
          </div>
        </fieldset>
        <TextField meta={logFields.value} label="Reading" inputMode="decimal" placeholder="e.g. 280" />
        <SelectField
          meta={logFields.scale}
          label="Meter's ppm scale"
          options={SCALE_OPTIONS}
          hint="The meter's manual says which. It matters for a TDS reading in ppm: the same water reads 1.4 times higher on a 0.7 meter."
        />
        <TextField meta={logFields.ph} label="pH" inputMode="decimal" placeholder="e.g. 6.2" />
        <FormErrors errors={logForm.errors} />
        {saved ? (
          <p className="text-sm text-good" role="status">
            ✓ Check saved.
          </p>
        ) : null}
        <button className="btn w-full" disabled={busy}>
          Save check
        </button>
      </Form>
    </section>
  );
}
