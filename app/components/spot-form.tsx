import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form, useNavigation } from "react-router";
import { FormErrors, SelectField, TextAreaField, TextField } from "~/components/field";
import { FACINGS } from "~/lib/forms";

const facingLabel: Record<(typeof FACINGS)[number], string> = {
  N: "North",
  NE: "North-east",
  E: "East",
  SE: "South-east",
  S: "South",
  SW: "South-west",
  W: "West",
  NW: "North-west",
  none: "No window / not by a window",
};

export function SpotForm({
  lastResult,
  defaultValue,
  submitLabel,
}: {
  lastResult?: SubmissionResult<string[]>;
  defaultValue?: { name: string; indoor: "indoor" | "outdoor"; facing: string; capacity: number; notes: string };
  submitLabel: string;
}) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult,
    defaultValue: defaultValue ?? { indoor: "indoor", facing: "none", capacity: 0 },
    // Validated by the action (the same zod schema); number fields round-trip more reliably that way.
    shouldValidate: "onSubmit",
  });
  return (
    <Form method="post" className="space-y-5" {...getFormProps(form)}>
      <FormErrors errors={form.errors} />
      <TextField meta={fields.name} label="Name" placeholder="Kitchen windowsill" />
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          meta={fields.indoor}
          label="Indoors or outdoors"
          options={[
            { value: "indoor", label: "Indoors" },
            { value: "outdoor", label: "Outdoors (balcony, bench, garden)" },
          ]}
        />
        <SelectField
          meta={fields.facing}
          label="Window facing"
          options={FACINGS.map((f) => ({ value: f, label: facingLabel[f] }))}
          hint="The way the glass looks out; it sets when direct sun can reach the spot."
        />
      </div>
      <TextField meta={fields.capacity} label="Room for how many pots" type="number" min={0} inputMode="numeric" />
      <TextAreaField meta={fields.notes} label="Notes" hint="Anything you know: radiator below, curtain at night, shade from a tree." />
      <button className="btn" disabled={navigation.state !== "idle"}>
        {submitLabel}
      </button>
    </Form>
  );
}
