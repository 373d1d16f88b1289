import { getFormProps, getInputProps, useForm, type SubmissionResult } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, useNavigation } from "react-router";
import type { z } from "zod";
import * as units from "~/domain/units";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm, refuseForm } from "~/.server/ids";
import { getRule, listRules } from "~/.server/alerts/pages";
import { getSpot } from "~/.server/spots";
import { addWatch, deleteWatch, setWatchPaused, suggestedColdWatch, updateWatch } from "~/.server/watches";
import type { Watch } from "~/db/schema.server";
import { describeCondition, formatDuration } from "~/domain/alerts/messages";
import { ALERT_KINDS, KINDS, type AlertKind } from "~/domain/alerts/rules";
import { WatchState } from "~/components/watch-state";
import { FieldError, FormErrors } from "~/components/field";
import { addWatchSchema, watchSchema } from "~/forms/watch";
import type { Route } from "./+types/spots.$spotId.alerts";

export const meta: Route.MetaFunction = ({ data }) => [
  { title: `Alerts for ${data?.spot.name ?? "spot"} · Nichewise` },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const [rules, suggestion] = await Promise.all([listRules(spot.id), suggestedColdWatch(spot.id, siteId)]);
  return { siteId, spot, role, unit: user.temperatureUnit, rules, suggestion };
}

const isTemp = (k: AlertKind) => KINDS[k].unit === "temperature" || KINDS[k].unit === "kelvin";
// Form values are in the member's unit; stored values are °C (and kelvin for margins).
const fromUnit = (k: AlertKind, v: number, unit: "C" | "F") =>
  !isTemp(k) ? v : KINDS[k].unit === "temperature" ? units.fromUnit(v, unit) : units.deltaFromUnit(v, unit);
const toUnitValue = (k: AlertKind, v: number, unit: "C" | "F") =>
  !isTemp(k) ? v : KINDS[k].unit === "temperature" ? units.toUnit(v, unit) : units.deltaToUnit(v, unit);
const deltaFromUnit = (k: AlertKind, v: number, unit: "C" | "F") => (isTemp(k) ? units.deltaFromUnit(v, unit) : v);
const deltaToUnit = (k: AlertKind, v: number, unit: "C" | "F") => (isTemp(k) ? units.deltaToUnit(v, unit) : v);
const round1 = (v: number) => Math.round(v * 10) / 10;

/** The stored settings (°C) from a parsed form (the member's unit). */
function storedSettings(v: z.output<typeof addWatchSchema>, unit: "C" | "F") {
  const silent = v.kind === "silent";
  return {
    threshold: round1(fromUnit(v.kind, v.threshold, unit) * 100) / 100,
    durationMinutes: silent ? 0 : v.durationMinutes!,
    hysteresis: silent ? 0 : Math.round(deltaFromUnit(v.kind, v.hysteresis!, unit) * 100) / 100,
    clearMinutes: silent ? 0 : v.clearMinutes!,
    earlyWarning: (v.kind === "cold" || v.kind === "heat") && v.earlyWarning,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  // Members only, before the body is read; the role the intent needs is checked below.
  await requireSiteRole(request, params.siteId, ALL_ROLES);
  const raw = await readForm(request);
  const intent = String(raw.get("intent") ?? "");
  // Carers may pause and resume a watch (plants brought in); everything else is the owner's.
  const { siteId, user } = await requireSiteRole(
    request,
    params.siteId,
    intent === "pause" || intent === "resume" ? WRITERS : ["owner"],
  );
  const spot = await getSpot(siteId, params.spotId);
  const unit = user.temperatureUnit;
  // A change keeps its watch's kind: the stored one, whatever the page sent.
  const changed = intent === "update" ? await getRule(spot.id, raw.get("ruleId")) : null;
  if (changed) raw.set("kind", changed.kind);
  const submission = parseWithZod(raw, { schema: watchSchema });
  if (submission.status !== "success") {
    if (intent !== "add" && intent !== "update") refuseForm(submission.error);
    return data(
      {
        intent,
        ruleId: changed ? String(changed.id) : "new",
        kind: String(submission.payload.kind ?? ""),
        result: submission.reply(),
      },
      { status: 400 },
    );
  }
  const form = submission.value;
  if (form.intent === "add") {
    const settings = storedSettings(form, unit);
    const suggestion = form.kind === "cold" && form.useSuggestion ? await suggestedColdWatch(spot.id, siteId) : null;
    // The suggestion's reason stays only while its line is the one saved.
    const reason = suggestion && Math.abs(suggestion.threshold - settings.threshold) < 0.1 ? suggestion.reason : "";
    const rule = await addWatch({ siteId, spot, actorId: user.id, kind: form.kind, settings, reason });
    return { saved: rule.id };
  }
  if (form.intent === "update") {
    await updateWatch({
      siteId,
      spot,
      actorId: user.id,
      rule: changed!,
      settings: storedSettings({ ...form, intent: "add" }, unit),
    });
    return { saved: changed!.id };
  }
  const rule = await getRule(spot.id, form.ruleId);
  if (form.intent === "delete") {
    await deleteWatch({ siteId, spot, actorId: user.id, rule });
    return { deleted: true };
  }
  const done = await setWatchPaused({ siteId, spot, actor: user, rule, paused: form.intent === "pause" });
  return { saved: rule.id, notified: done.notified.length };
}

const UNIT_LABEL = (k: AlertKind, unit: "C" | "F") =>
  ({
    temperature: `°${unit}`,
    kelvin: `°${unit} above the dew point`,
    percent: "%",
    minutes: "minutes without a reading",
  })[KINDS[k].unit];

type Initial = Pick<Watch, "threshold" | "durationMinutes" | "hysteresis" | "clearMinutes" | "earlyWarning">;

/** One watch's form (a change or a new watch), its fields in the member's unit; `children` are its buttons. */
function WatchForm({
  id,
  kind,
  unit,
  initial,
  lastResult,
  hidden,
  className,
  children,
}: {
  id: string;
  kind: AlertKind;
  unit: "C" | "F";
  initial: Initial;
  lastResult?: SubmissionResult<string[]>;
  hidden: Record<string, string>;
  className?: string;
  children: React.ReactNode;
}) {
  const [form, fields] = useForm({
    id,
    lastResult,
    defaultValue: {
      threshold: String(round1(toUnitValue(kind, initial.threshold, unit))),
      durationMinutes: String(initial.durationMinutes),
      hysteresis: String(round1(deltaToUnit(kind, initial.hysteresis, unit))),
      clearMinutes: String(initial.clearMinutes),
      earlyWarning: initial.earlyWarning ? "on" : undefined,
    },
    // The whole union: the same form's buttons also pause or remove the watch.
    onValidate: ({ formData }) => parseWithZod(formData, { schema: watchSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  const word = KINDS[kind].direction === "below" ? "Below" : "Above";
  const field = (meta: (typeof fields)["threshold"], label: string, inputMode: "decimal" | "numeric") => (
    <div>
      <label className="label" htmlFor={meta.id}>
        {label}
      </label>
      <input className="field" inputMode={inputMode} {...getInputProps(meta, { type: "text" })} />
      <FieldError meta={meta} />
    </div>
  );
  return (
    <Form method="post" className={className} {...getFormProps(form)}>
      <input type="hidden" name="kind" value={kind} />
      {Object.entries(hidden).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <div className="grid gap-3 sm:grid-cols-2">
        {field(fields.threshold, `${kind === "silent" ? "Silent for" : word} (${UNIT_LABEL(kind, unit)})`, "decimal")}
        {kind !== "silent" ? (
          <>
            {field(fields.durationMinutes, "For at least (minutes)", "numeric")}
            {field(fields.hysteresis, `All-clear once back by (${isTemp(kind) ? `°${unit}` : "%"})`, "decimal")}
            {field(fields.clearMinutes, "…and stayed back for (minutes)", "numeric")}
          </>
        ) : null}
        {kind === "cold" || kind === "heat" ? (
          <label className="inline-flex items-center gap-2 text-sm sm:col-span-2">
            <input {...getInputProps(fields.earlyWarning, { type: "checkbox" })} />
            Early warning: e-mail when the last hour's trend reaches the line within an hour
          </label>
        ) : null}
      </div>
      <FormErrors errors={form.errors} />
      {children}
    </Form>
  );
}

export default function SpotAlerts({ loaderData, actionData }: Route.ComponentProps) {
  const { siteId, spot, role, unit, rules, suggestion } = loaderData;
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const failed = actionData && "result" in actionData ? actionData : null;
  const failedNew = (kind: AlertKind) =>
    failed && failed.ruleId === "new" && failed.kind === kind ? failed.result : undefined;
  const hasCold = rules.some((r) => r.kind === "cold");
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-muted">
            <Link className="link" to={`/sites/${siteId}/spots/${spot.id}`}>
              {spot.name}
            </Link>
          </p>
          <h2 className="text-xl font-semibold">Alert watches</h2>
        </div>
        <Link className="btn-quiet" to={`/sites/${siteId}/alerts`}>
          All alerts of this site
        </Link>
      </div>

      <p role="note" className="card border-l-4 border-l-accent text-sm">
        <strong>Alerts are a help, not a guarantee.</strong> A sensor can fail, its battery can run out or its
        connection can drop, and an e-mail can arrive late. On a night you expect frost, bring tender plants in anyway.
        A silent-sensor watch tells you when this spot stops sending — the dangerous case on a cold night.
      </p>

      {rules.length === 0 ? <p className="text-muted">No watches on this spot yet.</p> : null}
      <ul className="space-y-4">
        {rules.map((r) => {
          const info = KINDS[r.kind];
          return (
            <li key={r.id} className="card space-y-3" aria-label={`${info.label} watch`}>
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h3 className="h2">
                  {info.label}: {describeCondition({ kind: r.kind, threshold: r.threshold, unit })}
                  {r.kind !== "silent" && r.durationMinutes > 0 ? ` for ${formatDuration(r.durationMinutes)}` : ""}
                </h3>
              </div>
              <WatchState paused={r.paused} />
              {r.reason ? <p className="hint">Why this line: {r.reason}</p> : null}
              {info.urgent ? <p className="hint">Sent even during quiet hours.</p> : null}
              {role === "owner" ? (
                <WatchForm
                  id={`watch-${r.id}`}
                  kind={r.kind}
                  unit={unit}
                  initial={r}
                  lastResult={failed && failed.ruleId === String(r.id) ? failed.result : undefined}
                  hidden={{ ruleId: String(r.id) }}
                  className="space-y-3"
                >
                  <div className="flex flex-wrap gap-2">
                    <button className="btn" name="intent" value="update" disabled={busy}>
                      Save
                    </button>
                    <button className="btn-danger" name="intent" value="delete" disabled={busy}>
                      Remove watch
                    </button>
                  </div>
                </WatchForm>
              ) : null}
              {role !== "mentor" ? (
                <Form method="post">
                  <input type="hidden" name="ruleId" value={r.id} />
                  <button className="btn-quiet" name="intent" value={r.paused ? "resume" : "pause"} disabled={busy}>
                    {r.paused ? "Resume watching" : "Pause (e.g. plants brought in)"}
                  </button>
                  {r.paused ? null : (
                    <span className="hint ml-2">
                      Pausing ends an open alert without an all-clear
                      {r.kind === "cold" || r.kind === "silent"
                        ? ", and the site's owners are e-mailed that you paused it"
                        : ""}
                      .
                    </span>
                  )}
                </Form>
              ) : null}
            </li>
          );
        })}
      </ul>

      {role === "owner" ? (
        <section className="card space-y-3">
          <h3 className="h2">Add a watch</h3>
          {!hasCold && !suggestion ? (
            <p className="text-sm text-muted" data-testid="no-cold-suggestion">
              No plants are placed here, so there is no cold-snap watch to suggest: its line follows the most
              cold-tender plant in the spot.
              {spot.indoor ? "" : " Placing a plant here adds one by itself (its lowest safe night plus 2 °C)."} You can
              still add one below.
            </p>
          ) : null}
          {!hasCold && suggestion ? (
            <div className="space-y-2 rounded-[0.2rem] border border-stone-line p-3">
              <p className="text-sm">
                Suggested cold-snap watch:{" "}
                <strong>
                  below {round1(toUnitValue("cold", suggestion.threshold, unit))} °{unit}
                </strong>
                . {suggestion.reason}
              </p>
              <WatchForm
                id="watch-suggested"
                kind="cold"
                unit={unit}
                initial={{ ...KINDS.cold.defaults, threshold: suggestion.threshold, earlyWarning: true }}
                lastResult={failedNew("cold")}
                hidden={{ intent: "add", useSuggestion: "1" }}
                className="space-y-2"
              >
                <button className="btn" disabled={busy}>
                  Add this cold watch
                </button>
              </WatchForm>
            </div>
          ) : null}
          <details>
            <summary className="cursor-pointer text-sm font-medium">Another kind of watch</summary>
            <div className="mt-3 space-y-4">
              {ALERT_KINDS.filter((k) => k !== "cold" || hasCold || !suggestion).map((k) => (
                <div key={k} className="space-y-2 rounded-[0.2rem] border border-stone-line p-3">
                  <p className="text-sm font-medium">{KINDS[k].label}</p>
                  <WatchForm
                    id={`watch-new-${k}`}
                    kind={k}
                    unit={unit}
                    initial={{ ...KINDS[k].defaults, earlyWarning: true }}
                    lastResult={failedNew(k)}
                    hidden={{ intent: "add" }}
                    className="space-y-2"
                  >
                    <button className="btn-quiet" disabled={busy}>
                      Add {KINDS[k].label.toLowerCase()} watch
                    </button>
                  </WatchForm>
                </div>
              ))}
            </div>
          </details>
        </section>
      ) : null}
    </div>
  );
}
