// The plants standing in a spot now: add, move to another spot, remove (owner and carer).
import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form } from "react-router";
import { ChoiceSelect, FieldError, FormErrors, SelectField, TextField } from "~/components/field";
import { addPlantSchema } from "~/forms/inventory";
import { VerdictBadge } from "~/components/season";
import { PlantIcon } from "~/components/icons";
import { formatTemp, type TempUnit } from "~/domain/units";
import { IntentButton } from "~/components/intent-button";

export type StandingPlant = {
  id: number;
  plantKey: string;
  plantName: string;
  nickname: string;
  pots: number;
  verdict: string | null;
};

export function Inventory({
  standing,
  plants,
  otherSpots,
  tender,
  canEdit,
  unit,
  capacity,
  error,
  lastResult,
  busy,
}: {
  standing: StandingPlant[];
  plants: { key: string; name: string }[];
  otherSpots: { id: number; name: string }[];
  tender: { name: string; minNightC: number } | null;
  canEdit: boolean;
  unit: TempUnit;
  capacity: number;
  error?: string;
  /** The server's answer to a refused add, with what was typed. */
  lastResult?: SubmissionResult<string[]>;
  busy: boolean;
}) {
  const pots = standing.reduce((s, p) => s + p.pots, 0);
  const [addForm, addFields] = useForm({
    id: "plant-add",
    lastResult,
    defaultValue: { pots: "1" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: addPlantSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  return (
    <section className="card space-y-4" data-testid="inventory">
      <div>
        <h3 className="h2 flex items-center gap-2">
          <PlantIcon size={20} />
          Plants here now
        </h3>
        <p className="text-sm text-muted">
          {standing.length === 0
            ? "Nothing recorded in this spot yet."
            : `${pots} ${pots === 1 ? "pot" : "pots"}${capacity ? ` of room for ${capacity}` : ""}.`}
          {tender
            ? ` Most tender: ${tender.name}, which wants nights of ${formatTemp(tender.minNightC, unit, 0)} or more — ` +
              "cold alerts for this spot start from it."
            : ""}
        </p>
      </div>
      {standing.length > 0 ? (
        <ul className="divide-y divide-line">
          {standing.map((p) => (
            <li key={p.id} className="flex flex-wrap items-center gap-x-3 gap-y-2 py-2">
              <div className="min-w-0 flex-1">
                <p className="font-medium">{p.nickname || p.plantName}</p>
                <p className="text-sm text-muted">
                  {p.nickname ? `${p.plantName} · ` : ""}
                  {p.pots} {p.pots === 1 ? "pot" : "pots"}
                </p>
              </div>
              {p.verdict ? <VerdictBadge verdict={p.verdict} /> : null}
              {canEdit ? (
                <div className="flex flex-wrap items-center gap-2">
                  {otherSpots.length > 0 ? (
                    <Form method="post" className="flex items-center gap-1">
                      <input type="hidden" name="intent" value="plant-move" />
                      <input type="hidden" name="id" value={p.id} />
                      <label className="sr-only" htmlFor={`move-${p.id}`}>
                        Move {p.nickname || p.plantName} to
                      </label>
                      <ChoiceSelect
                        id={`move-${p.id}`}
                        name="toSpotId"
                        placeholder="Move to…"
                        choices={otherSpots}
                        className="field w-auto py-1 text-sm"
                      />
                      <button className="btn-quiet py-1 text-sm" disabled={busy}>
                        Move
                      </button>
                    </Form>
                  ) : null}
                  <IntentButton
                    intent="plant-remove"
                    fields={{ id: p.id }}
                    className="btn-quiet py-1 text-sm"
                    busy={busy}
                    label={`Remove ${p.nickname || p.plantName} from this spot`}
                  >
                    Remove
                  </IntentButton>
                </div>
              ) : null}
            </li>
          ))}
        </ul>
      ) : null}
      {canEdit ? (
        <details open={Boolean(error || lastResult)} className="group">
          <summary className="btn-quiet cursor-pointer list-none">Add a plant here</summary>
          <Form
            method="post"
            className="mt-3 grid gap-3 sm:grid-cols-[2fr_2fr_1fr_auto] sm:items-end"
            {...getFormProps(addForm)}
          >
            <input type="hidden" name="intent" value="plant-add" />
            <SelectField
              meta={addFields.plantKey}
              label="Plant"
              options={plants.map((p) => ({ value: p.key, label: p.name }))}
              inlineError={false}
            />
            <TextField
              meta={addFields.nickname}
              label="Its name (optional)"
              maxLength={60}
              placeholder="e.g. the pink one from the fair"
              inlineError={false}
            />
            <TextField meta={addFields.pots} label="Pots" type="number" min={1} max={100} inlineError={false} />
            <button className="btn" disabled={busy}>
              Add here
            </button>
            <div className="sm:col-span-4">
              <FieldError meta={addFields.plantKey} />
              <FieldError meta={addFields.nickname} />
              <FieldError meta={addFields.pots} />
              <FormErrors errors={addForm.errors} />
              {error ? (
                <p className="error" role="alert">
                  {error}
                </p>
              ) : null}
            </div>
          </Form>
        </details>
      ) : null}
    </section>
  );
}
