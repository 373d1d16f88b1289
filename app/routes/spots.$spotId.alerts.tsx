import { data, Form, Link, useNavigation } from "react-router";
import * as units from "~/domain/units";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { getRule, listRules } from "~/.server/alerts/pages";
import { getSpot } from "~/.server/spots";
import { addWatch, deleteWatch, setWatchPaused, suggestedColdWatch, updateWatch } from "~/.server/watches";
import type { Watch } from "~/db/schema.server";
import { describeCondition, formatDuration } from "~/domain/alerts/messages";
import { ALERT_KINDS, KINDS, type AlertKind } from "~/domain/alerts/rules";
import { WatchState } from "~/components/watch-state";
import type { Route } from "./+types/spots.$spotId.alerts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Alerts for ${data?.spot.name ?? "spot"} · Nichewise` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const [rules, suggestion] = await Promise.all([listRules(spot.id), suggestedColdWatch(spot.id, siteId)]);
  return { siteId, spot, role, unit: user.temperatureUnit, rules, suggestion };
}

type Values = Record<string, string>;
const isTemp = (k: AlertKind) => KINDS[k].unit === "temperature" || KINDS[k].unit === "kelvin";
// Form values are in the member's unit; stored values are °C (and kelvin for margins).
const fromUnit = (k: AlertKind, v: number, unit: "C" | "F") =>
  !isTemp(k) ? v : KINDS[k].unit === "temperature" ? units.fromUnit(v, unit) : units.deltaFromUnit(v, unit);
const toUnitValue = (k: AlertKind, v: number, unit: "C" | "F") =>
  !isTemp(k) ? v : KINDS[k].unit === "temperature" ? units.toUnit(v, unit) : units.deltaToUnit(v, unit);
const deltaFromUnit = (k: AlertKind, v: number, unit: "C" | "F") => (isTemp(k) ? units.deltaFromUnit(v, unit) : v);
const deltaToUnit = (k: AlertKind, v: number, unit: "C" | "F") => (isTemp(k) ? units.deltaToUnit(v, unit) : v);
const round1 = (v: number) => Math.round(v * 10) / 10;

function parseRule(form: FormData, kind: AlertKind, unit: "C" | "F") {
  const values: Values = {};
  for (const k of ["threshold", "durationMinutes", "hysteresis", "clearMinutes"]) values[k] = String(form.get(k) ?? "").trim();
  const num = (k: string) => (values[k] === "" ? NaN : Number(values[k].replace(",", ".")));
  const threshold = num("threshold");
  const durationMinutes = kind === "silent" ? 0 : num("durationMinutes");
  const hysteresis = kind === "silent" ? 0 : num("hysteresis");
  const clearMinutes = kind === "silent" ? 0 : num("clearMinutes");
  if (!Number.isFinite(threshold)) return { error: "Enter the threshold as a number.", values };
  if (kind === "silent" && !(threshold >= 5 && threshold <= 1440)) return { error: "A sensor may be silent for 5 to 1,440 minutes before the alert.", values };
  if ((kind === "dry" || kind === "battery") && !(threshold > 0 && threshold < 100)) return { error: "Enter a percentage between 0 and 100.", values };
  if (!(Number.isInteger(durationMinutes) && durationMinutes >= 0 && durationMinutes <= 1440)) return { error: "Minutes before the alert: a whole number from 0 to 1,440.", values };
  if (!(Number.isInteger(clearMinutes) && clearMinutes >= 0 && clearMinutes <= 1440)) return { error: "Minutes before the all-clear: a whole number from 0 to 1,440.", values };
  if (!(hysteresis >= 0 && hysteresis <= 20)) return { error: "The margin for the all-clear must be between 0 and 20.", values };
  return {
    ok: {
      threshold: round1(fromUnit(kind, threshold, unit) * 100) / 100,
      durationMinutes,
      hysteresis: Math.round(deltaFromUnit(kind, hysteresis, unit) * 100) / 100,
      clearMinutes,
      earlyWarning: (kind === "cold" || kind === "heat") && form.get("earlyWarning") === "on",
    },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  // Members only, before the body is read; the role the intent needs is checked below.
  await requireSiteRole(request, params.siteId, ALL_ROLES);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  // Carers may pause and resume a watch (plants brought in); everything else is the owner's.
  const { siteId, user } = await requireSiteRole(request, params.siteId, intent === "pause" || intent === "resume" ? WRITERS : ["owner"]);
  const spot = await getSpot(siteId, params.spotId);
  const unit = user.temperatureUnit;
  if (intent === "pause" || intent === "resume") {
    const rule = await getRule(spot.id, form.get("ruleId"));
    const done = await setWatchPaused({ siteId, spot, actor: user, rule, paused: intent === "pause" });
    return { saved: rule.id, notified: done.notified.length };
  }
  if (intent === "add") {
    const kind = String(form.get("kind")) as AlertKind;
    if (!ALERT_KINDS.includes(kind)) return data({ error: "Choose what to watch for.", ruleId: "new", values: {} as Values }, { status: 400 });
    const parsed = parseRule(form, kind, unit);
    if (!parsed.ok) return data({ error: parsed.error, ruleId: "new", values: { ...parsed.values, kind } }, { status: 400 });
    const suggestion = kind === "cold" && form.get("useSuggestion") === "1" ? await suggestedColdWatch(spot.id, siteId) : null;
    // The suggestion's reason stays only while its line is the one saved.
    const reason = suggestion && Math.abs(suggestion.threshold - parsed.ok.threshold) < 0.1 ? suggestion.reason : "";
    const rule = await addWatch({ siteId, spot, actorId: user.id, kind, settings: parsed.ok, reason });
    return { saved: rule.id };
  }
  if (intent === "update") {
    const rule = await getRule(spot.id, form.get("ruleId"));
    const parsed = parseRule(form, rule.kind, unit);
    if (!parsed.ok) return data({ error: parsed.error, ruleId: String(rule.id), values: parsed.values }, { status: 400 });
    await updateWatch({ siteId, spot, actorId: user.id, rule, settings: parsed.ok });
    return { saved: rule.id };
  }
  if (intent === "delete") {
    const rule = await getRule(spot.id, form.get("ruleId"));
    await deleteWatch({ siteId, spot, actorId: user.id, rule });
    return { deleted: true };
  }
  throw data("Unknown action", { status: 400 });
}

const UNIT_LABEL = (k: AlertKind, unit: "C" | "F") =>
  ({ temperature: `°${unit}`, kelvin: `°${unit} above the dew point`, percent: "%", minutes: "minutes without a reading" })[KINDS[k].unit];

function RuleFields({ kind, unit, rule, values, idPrefix }: { kind: AlertKind; unit: "C" | "F"; rule?: Pick<Watch, "threshold" | "durationMinutes" | "hysteresis" | "clearMinutes" | "earlyWarning">; values?: Values; idPrefix: string }) {
  const d = KINDS[kind].defaults;
  const v = (k: "threshold" | "durationMinutes" | "hysteresis" | "clearMinutes", fallback: number) => values?.[k] ?? String(fallback);
  const threshold = round1(toUnitValue(kind, rule?.threshold ?? d.threshold, unit));
  const hysteresis = round1(deltaToUnit(kind, rule?.hysteresis ?? d.hysteresis, unit));
  const word = KINDS[kind].direction === "below" ? "Below" : "Above";
  return (
    <div className="grid gap-3 sm:grid-cols-2">
      <div>
        <label className="label" htmlFor={`${idPrefix}-threshold`}>
          {kind === "silent" ? "Silent for" : word} ({UNIT_LABEL(kind, unit)})
        </label>
        <input className="field" id={`${idPrefix}-threshold`} name="threshold" inputMode="decimal" defaultValue={v("threshold", threshold)} />
      </div>
      {kind !== "silent" ? (
        <>
          <div>
            <label className="label" htmlFor={`${idPrefix}-duration`}>For at least (minutes)</label>
            <input className="field" id={`${idPrefix}-duration`} name="durationMinutes" inputMode="numeric" defaultValue={v("durationMinutes", rule?.durationMinutes ?? d.durationMinutes)} />
          </div>
          <div>
            <label className="label" htmlFor={`${idPrefix}-hysteresis`}>All-clear once back by ({isTemp(kind) ? `°${unit}` : "%"})</label>
            <input className="field" id={`${idPrefix}-hysteresis`} name="hysteresis" inputMode="decimal" defaultValue={v("hysteresis", hysteresis)} />
          </div>
          <div>
            <label className="label" htmlFor={`${idPrefix}-clear`}>…and stayed back for (minutes)</label>
            <input className="field" id={`${idPrefix}-clear`} name="clearMinutes" inputMode="numeric" defaultValue={v("clearMinutes", rule?.clearMinutes ?? d.clearMinutes)} />
          </div>
        </>
      ) : null}
      {kind === "cold" || kind === "heat" ? (
        <label className="inline-flex items-center gap-2 text-sm sm:col-span-2">
          <input type="checkbox" name="earlyWarning" defaultChecked={rule?.earlyWarning ?? true} />
          Early warning: e-mail when the last hour's trend reaches the line within an hour
        </label>
      ) : null}
    </div>
  );
}

export default function SpotAlerts({ loaderData, actionData }: Route.ComponentProps) {
  const { siteId, spot, role, unit, rules, suggestion } = loaderData;
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const err = actionData && "error" in actionData ? actionData : null;
  const hasCold = rules.some((r) => r.kind === "cold");
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-sm text-muted">
            <Link className="link" to={`/sites/${siteId}/spots/${spot.id}`}>{spot.name}</Link>
          </p>
          <h2 className="text-xl font-semibold">Alert watches</h2>
        </div>
        <Link className="btn-quiet" to={`/sites/${siteId}/alerts`}>All alerts of this site</Link>
      </div>

      <p role="note" className="card border-l-4 border-l-accent text-sm">
        <strong>Alerts are a help, not a guarantee.</strong> A sensor can fail, its battery can run out or its connection can drop,
        and an e-mail can arrive late. On a night you expect frost, bring tender plants in anyway. A silent-sensor watch tells you
        when this spot stops sending — the dangerous case on a cold night.
      </p>

      {err ? <p className="error" role="alert">{err.error}</p> : null}

      {rules.length === 0 ? <p className="text-muted">No watches on this spot yet.</p> : null}
      <ul className="space-y-4">
        {rules.map((r) => {
          const info = KINDS[r.kind];
          const mine = err && err.ruleId === String(r.id) ? err.values : undefined;
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
                <Form method="post" className="space-y-3">
                  <input type="hidden" name="ruleId" value={r.id} />
                  <RuleFields kind={r.kind} unit={unit} rule={r} values={mine} idPrefix={`rule-${r.id}`} />
                  <div className="flex flex-wrap gap-2">
                    <button className="btn" name="intent" value="update" disabled={busy}>Save</button>
                    <button className="btn-danger" name="intent" value="delete" disabled={busy}>Remove watch</button>
                  </div>
                </Form>
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
                      {r.kind === "cold" || r.kind === "silent" ? ", and the site's owners are e-mailed that you paused it" : ""}.
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
              No plants are placed here, so there is no cold-snap watch to suggest: its line follows the most cold-tender plant in the spot.
              {spot.indoor ? "" : " Placing a plant here adds one by itself (its lowest safe night plus 2 °C)."} You can still add one below.
            </p>
          ) : null}
          {!hasCold && suggestion ? (
            <Form method="post" className="space-y-2 rounded-[0.2rem] border border-stone-line p-3">
              <input type="hidden" name="intent" value="add" />
              <input type="hidden" name="kind" value="cold" />
              <input type="hidden" name="useSuggestion" value="1" />
              <p className="text-sm">
                Suggested cold-snap watch: <strong>below {round1(toUnitValue("cold", suggestion.threshold, unit))} °{unit}</strong>. {suggestion.reason}
              </p>
              <RuleFields kind="cold" unit={unit} rule={{ ...KINDS.cold.defaults, threshold: suggestion.threshold, earlyWarning: true }} values={err?.ruleId === "new" && err.values.kind === "cold" ? err.values : undefined} idPrefix="suggested" />
              <button className="btn" disabled={busy}>Add this cold watch</button>
            </Form>
          ) : null}
          <details>
            <summary className="cursor-pointer text-sm font-medium">Another kind of watch</summary>
            <div className="mt-3 space-y-4">
              {ALERT_KINDS.filter((k) => k !== "cold" || hasCold || !suggestion).map((k) => (
                <Form key={k} method="post" className="space-y-2 rounded-[0.2rem] border border-stone-line p-3">
                  <input type="hidden" name="intent" value="add" />
                  <input type="hidden" name="kind" value={k} />
                  <p className="text-sm font-medium">{KINDS[k].label}</p>
                  <RuleFields kind={k} unit={unit} values={err?.ruleId === "new" && err.values.kind === k ? err.values : undefined} idPrefix={`new-${k}`} />
                  <button className="btn-quiet" disabled={busy}>Add {KINDS[k].label.toLowerCase()} watch</button>
                </Form>
              ))}
            </div>
          </details>
        </section>
      ) : null}
    </div>
  );
}
