import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { requireSiteRole } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { freeOwnKey, saveCustomProfile, sitePlants } from "~/.server/plants";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { plantFormSchema, profileFromForm, slugOf } from "~/forms/plant";
import { deltaFromUnit, deltaToUnit, fromUnit, toUnit } from "~/domain/units";
import type { Route } from "./+types/plants.new";

export const meta: Route.MetaFunction = () => [{ title: "Your own plant profile · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const from = new URL(request.url).searchParams.get("from");
  const base = from ? ((await sitePlants(siteId)).find((p) => p.key === from) ?? null) : null;
  return {
    siteId,
    unit: user.temperatureUnit,
    base,
    editing: base?.own ? base.key : null,
    library: PLANT_LIBRARY.map((p) => ({ key: p.key, name: p.name })),
  };
}

const TEMP_FIELDS = ["minNightC", "maxDayC", "coolNightC"];

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const unit = user.temperatureUnit;
  const raw = await readForm(request);
  // The form is typed in the grower's unit; the profile is stored in °C.
  const form = new FormData();
  for (const [k, v] of raw) {
    const n = typeof v === "string" && v.trim() !== "" ? Number(v) : NaN;
    if (unit === "F" && Number.isFinite(n) && TEMP_FIELDS.includes(k))
      form.set(k, String(Math.round(fromUnit(n, unit) * 10) / 10));
    else if (unit === "F" && Number.isFinite(n) && k === "difC")
      form.set(k, String(Math.round(deltaFromUnit(n, unit) * 10) / 10));
    else form.set(k, v);
  }
  const submission = parseWithZod(form, { schema: plantFormSchema });
  if (submission.status !== "success") return data({ errors: submission.reply().error ?? {} }, { status: 400 });
  const plants = await sitePlants(siteId);
  const library = PLANT_LIBRARY.find((p) => p.key === submission.value.basedOn);
  const editing = raw.get("editing");
  const current = plants.find((p) => p.own && p.key === editing);
  const key = current ? current.key : await freeOwnKey(siteId, slugOf(submission.value.name));
  // Unchanged values keep the sources of the profile being edited, or of the library profile copied.
  const profile = profileFromForm(key, submission.value, current ?? library);
  await saveCustomProfile(siteId, user.id, profile, library?.key ?? null);
  return redirect(`/sites/${siteId}/plants/${key}`);
}

export default function NewPlant({ loaderData, actionData }: Route.ComponentProps) {
  const { base, unit, editing } = loaderData;
  const errors: Record<string, string[] | null | undefined> =
    actionData && "errors" in actionData ? actionData.errors : {};
  const busy = useNavigation().state !== "idle";
  const t = (c: number | undefined) => (c == null ? undefined : Math.round(toUnit(c, unit) * 10) / 10);
  const field = (
    name: string,
    label: string,
    opts: { type?: string; defaultValue?: string | number; hint?: string; step?: string; required?: boolean } = {},
  ) => (
    <div>
      <label className="label" htmlFor={name}>
        {label}
      </label>
      <input
        id={name}
        name={name}
        type={opts.type ?? "number"}
        step={opts.step ?? (opts.type ? undefined : "0.1")}
        className="field"
        defaultValue={opts.defaultValue}
        required={opts.required}
        aria-invalid={errors[name] ? true : undefined}
        aria-describedby={errors[name] ? `${name}-error` : opts.hint ? `${name}-hint` : undefined}
      />
      {opts.hint ? (
        <p id={`${name}-hint`} className="hint">
          {opts.hint}
        </p>
      ) : null}
      {errors[name] ? (
        <p id={`${name}-error`} className="error" role="alert">
          {errors[name]!.join(" ")}
        </p>
      ) : null}
    </div>
  );
  const cp = base?.flowering.coolPeriod;
  return (
    <div className="max-w-3xl space-y-6">
      <p className="text-sm">
        <Link to={`/sites/${loaderData.siteId}/plants`} className="link">
          ← All plants
        </Link>
      </p>
      <div>
        <h2 className="h2">
          {editing ? `Edit ${base!.name}` : base ? `Copy ${base.name} to adjust` : "Your own plant profile"}
        </h2>
        <p className="text-sm text-muted">
          Fits on every spot page include this site's own profiles. Values you keep from a library profile keep their
          sources; values you change are credited to you, with the source you give below.
        </p>
      </div>
      <Form method="post" className="card space-y-5" noValidate>
        <input type="hidden" name="basedOn" value={base?.own ? (base.basedOn ?? "") : (base?.key ?? "")} />
        {editing ? <input type="hidden" name="editing" value={editing} /> : null}
        <div className="grid gap-4 sm:grid-cols-2">
          {field("name", "Name", {
            type: "text",
            defaultValue: base ? (editing ? base.name : `${base.name} (my plants)`) : "",
            required: true,
          })}
          <div>
            <label className="label" htmlFor="group">
              Kind
            </label>
            <select id="group" name="group" className="field" defaultValue={base?.group ?? "orchid"}>
              <option value="orchid">Orchid</option>
              <option value="other">Other tropical</option>
            </select>
          </div>
        </div>
        <fieldset className="grid gap-4 sm:grid-cols-2">
          <legend className="mb-2 font-medium">Temperature (°{unit})</legend>
          {field("minNightC", `Lowest safe night (°${unit})`, {
            defaultValue: t(base?.minNightC),
            hint: "The temperature group follows from it: under 13 °C cool, 13–16 °C intermediate, 16 °C and up warm.",
          })}
          {field("maxDayC", `Highest comfortable day (°${unit})`, { defaultValue: t(base?.maxDayC) })}
          {field("coldTolerance", "How it takes the cold", {
            type: "text",
            defaultValue: base?.coldTolerance ?? "",
            hint: "In words, e.g. “leaf damage below about 10 °C”.",
          })}
        </fieldset>
        <fieldset className="grid gap-4 sm:grid-cols-2">
          <legend className="mb-2 font-medium">Humidity and light</legend>
          {field("humidityMin", "Lowest humidity (%)", { defaultValue: base?.humidityMin, step: "1" })}
          {field("humidityMax", "Highest humidity (%)", { defaultValue: base?.humidityMax, step: "1" })}
          <div>
            <label className="label" htmlFor="light">
              Light
            </label>
            <select id="light" name="light" className="field" defaultValue={base?.light ?? "medium"}>
              <option value="low">Low (shaded window)</option>
              <option value="medium">Medium (bright, some sun)</option>
              <option value="high">High (sun for part of the day)</option>
            </select>
          </div>
          <div className="grid grid-cols-2 gap-3">
            {field("dliMin", "Daily light from", { defaultValue: base?.dliMin, hint: "mol m⁻² d⁻¹" })}
            {field("dliMax", "Daily light to", { defaultValue: base?.dliMax })}
          </div>
        </fieldset>
        <fieldset className="grid gap-4 sm:grid-cols-2">
          <legend className="mb-2 font-medium">To flower (leave empty if it needs no cue)</legend>
          {field("difC", `Day–night difference it needs (°${unit})`, {
            defaultValue:
              base?.flowering.difC != null ? Math.round(deltaToUnit(base.flowering.difC, unit) * 10) / 10 : undefined,
          })}
          <div className="grid grid-cols-2 gap-3">
            {field("coolNightC", `Cool period: nights at most (°${unit})`, { defaultValue: t(cp?.maxNightC) })}
            {field("coolWeeks", "for weeks", { defaultValue: cp?.weeks, step: "1" })}
          </div>
          <div className="sm:col-span-2">
            {field("floweringNote", "Note on flowering", { type: "text", defaultValue: base?.flowering.note ?? "" })}
          </div>
        </fieldset>
        {field("summary", "One sentence for a beginner", { type: "text", defaultValue: base?.summary ?? "" })}
        {field("source", "Where your values come from", {
          type: "text",
          hint: "A book, a nursery's culture sheet, your own years of growing it… Left empty, changed values show as “from memory”.",
        })}
        <button className="btn" disabled={busy}>
          Save profile
        </button>
      </Form>
    </div>
  );
}
