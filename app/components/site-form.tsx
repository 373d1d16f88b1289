import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form, useNavigation } from "react-router";
import { FormErrors, SelectField, TextField } from "~/components/field";

const zones = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : ["UTC"];

export function SiteForm({
  lastResult,
  defaultValue,
  submitLabel,
}: {
  lastResult?: SubmissionResult<string[]>;
  defaultValue?: { name: string; latitude: number; longitude: number; timeZone: string };
  submitLabel: string;
}) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult,
    defaultValue: defaultValue ?? { timeZone: "Europe/London" },
    // Validated by the action (the same zod schema); number fields round-trip more reliably that way.
    shouldValidate: "onSubmit",
  });
  return (
    <Form method="post" className="space-y-5" {...getFormProps(form)}>
      <FormErrors errors={form.errors} />
      <TextField meta={fields.name} label="Name" placeholder="Our flat" />
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField meta={fields.latitude} label="Latitude (°, north positive)" type="text" inputMode="decimal" placeholder="51.70" />
        <TextField meta={fields.longitude} label="Longitude (°, east positive)" type="text" inputMode="decimal" placeholder="-2.20" />
      </div>
      <p className="hint -mt-2">
        Why we ask: sunrise and sunset at your place split each day from its night, so the day–night difference your plants
        feel is measured at your own hours. The hemisphere follows from the latitude and sets which months are winter. Two
        decimals (about a kilometre) are plenty.
      </p>
      <SelectField meta={fields.timeZone} label="Time zone" options={zones.map((z) => ({ value: z, label: z.replace(/_/g, " ") }))} />
      <button className="btn" disabled={navigation.state !== "idle"}>
        {submitLabel}
      </button>
    </Form>
  );
}
