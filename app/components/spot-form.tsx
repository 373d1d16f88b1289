import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form, useNavigation } from "react-router";
import { FormErrors, SelectField, TextAreaField, TextField } from "~/components/field";
import { LIGHT_SOURCE_LABELS } from "~/domain/climate/light";
import {
  FACING_WORDS,
  GLAZINGS,
  LIGHT_SOURCES,
  SPOT_FACINGS,
  type Glazing,
  type SpotFacing,
} from "~/domain/vocabulary";

const glazingLabel: Record<Glazing, string> = {
  single: "Single glazing",
  double: "Double glazing",
  old_double: "Older double glazing (before about 2000, no low-e coating)",
  triple: "Triple glazing",
  none: "No glass (open window or frame)",
};

const facingLabel = (f: SpotFacing) =>
  f === "none" ? "No window / not by a window" : FACING_WORDS[f].charAt(0).toUpperCase() + FACING_WORDS[f].slice(1);

export function SpotForm({
  lastResult,
  defaultValue,
  submitLabel,
}: {
  lastResult?: SubmissionResult<string[]>;
  defaultValue?: {
    name: string;
    indoor: "indoor" | "outdoor";
    facing: string;
    capacity: number;
    notes: string;
    lightSource: string;
    glazing: string;
  };
  submitLabel: string;
}) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult,
    defaultValue: defaultValue ?? { indoor: "indoor", facing: "none", capacity: 0, lightSource: "sun", glazing: "" },
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
          options={SPOT_FACINGS.map((f) => ({ value: f, label: facingLabel(f) }))}
          hint="The way the glass looks out; it sets when direct sun can reach the spot."
        />
      </div>
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          meta={fields.lightSource}
          label="What lights it"
          options={LIGHT_SOURCES.map((s) => ({ value: s, label: LIGHT_SOURCE_LABELS[s] }))}
          hint="A light sensor's lux turns into the plants' light (DLI) differently under lamps than under daylight."
        />
        <SelectField
          meta={fields.glazing}
          label="Window glazing"
          options={[{ value: "", label: "Not given" }, ...GLAZINGS.map((g) => ({ value: g, label: glazingLabel[g] }))]}
          hint="For a windowsill: how cold the glass gets on cold nights. Kept only for a spot by a window."
        />
      </div>
      <TextField meta={fields.capacity} label="Room for how many pots" type="number" min={0} inputMode="numeric" />
      <TextAreaField
        meta={fields.notes}
        label="Notes"
        hint="Anything you know: radiator below, curtain at night, shade from a tree."
      />
      <button className="btn" disabled={navigation.state !== "idle"}>
        {submitLabel}
      </button>
    </Form>
  );
}
