// A fit reason's twelve-cell month strip (issue 17): for each month of the year, whether the spot
// passes the rule, asks for care, fails it, or has not been measured — and whether that month's
// state rests on the projection (fit/projected.ts) rather than on readings. Pure: the summary
// (.server/profiles.ts) derives it from a rule's result and the fit's basis; the page draws it.
import type { Fact, CheckResult } from "~/domain/fit/facts";
import { MONTH_SHORT } from "~/lib/date-words";

export type MonthState = "pass" | "care" | "fail" | "unmeasured";
export type StripCell = { month: number; state: MonthState; projected: boolean };

/** The months in the order the site's year strip draws them: January to December in both hemispheres, so a reason's strip lines up with the year above it. */
export const STRIP_ORDER = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12];
export { MONTH_SHORT };

/** Rules judged month by month. Flowering is a cue over weeks in its season, not a monthly pass or fail: no strip. */
const STRIP_RULES = new Set(["cold-nights", "warm-nights", "hot-days", "humidity", "light", "condensation"]);

export const RULE_LABEL: Record<string, string> = {
  "cold-nights": "Cold nights",
  "warm-nights": "Warm nights",
  "hot-days": "Hot days",
  humidity: "Humidity",
  light: "Light",
  condensation: "Condensation",
};

/** Facts whose months are the months past the damage line (a fail even when the rule as a whole is only care). */
const DAMAGE_KINDS = new Set<Fact["kind"]>(["cold-damage", "heat-damage"]);

const monthsOfFact = (f: Fact): number[] => {
  if (f.kind === "light-months") return [...f.dim, ...f.bright];
  if ("months" in f && Array.isArray(f.months))
    return (f.months as unknown[]).filter((m): m is number => typeof m === "number");
  return [];
};

/**
 * The strip for one reason, or null where a strip would say nothing true (flowering; a rule with
 * nothing to judge; a reason that asks for something without naming months, like a window's
 * facing judged without a light sensor).
 *
 * `basis.measured`: months of the year with enough readings; `basis.projected`: months the
 * projection fills. A month the rule names takes the rule's level (poor → fail, care → care, a
 * damaging episode → fail), marked projected when only a projected fact names it; any other month
 * passes if it is measured (or projected), else it is not measured.
 */
export function monthStrip(
  reason: Pick<CheckResult, "rule" | "level" | "facts" | "months" | "noData">,
  basis: { measured: number[]; projected?: number[] },
): StripCell[] | null {
  if (!STRIP_RULES.has(reason.rule) || reason.noData || reason.level === "unknown") return null;
  const measured = new Set(basis.measured);
  const projected = new Set(basis.projected ?? []);
  // Light is measured where the light sensor read, not where the temperature did.
  const light = reason.facts.find((f) => f.kind === "light-months");
  if (light && light.kind === "light-months") {
    measured.clear();
    for (const m of light.months) measured.add(m.month);
  }
  const named = new Map<number, { state: MonthState; projected: boolean }>();
  const levelState: MonthState = reason.level === "poor" ? "fail" : reason.level === "care" ? "care" : "pass";
  for (const f of reason.facts) {
    if (f.kind === "projected-ok" || f.kind === "light-clipped") continue;
    const isProjected = f.kind.startsWith("projected-");
    let state: MonthState = DAMAGE_KINDS.has(f.kind) ? "fail" : levelState;
    if (light && f.kind === "light-months" && reason.level === "poor") state = "care";
    for (const m of monthsOfFact(f)) {
      const had = named.get(m);
      const worse = !had || rank(state) > rank(had.state);
      named.set(m, { state: worse ? state : had!.state, projected: had ? had.projected && isProjected : isProjected });
    }
    // A poor light rule: the scorching (or far too dim) months are the fails, the rest of dim/bright asks for care.
    if (light && f.kind === "light-months" && reason.level === "poor")
      for (const m of f.scorch) named.set(m, { state: "fail", projected: false });
  }
  // Months from the rule's own month list (the rules also name them there) when no fact did.
  for (const key of reason.months ?? []) {
    const m = Number(key);
    if (m >= 1 && m <= 12 && !named.has(m)) named.set(m, { state: levelState, projected: false });
  }
  if (named.size === 0 && reason.level !== "good") return null;
  // A poor light rule whose dim/bright months are all care but no scorch: still a fail somewhere? Then every named month fails.
  if (reason.level === "poor" && ![...named.values()].some((c) => c.state === "fail"))
    for (const c of named.values()) c.state = "fail";
  return STRIP_ORDER.map((month) => {
    const n = named.get(month);
    if (n) return { month, state: n.state, projected: n.projected || (!measured.has(month) && projected.has(month)) };
    if (measured.has(month)) return { month, state: "pass", projected: false };
    if (projected.has(month)) return { month, state: "pass", projected: true };
    return { month, state: "unmeasured", projected: false };
  });
}

const RANK: Record<MonthState, number> = { unmeasured: 0, pass: 1, care: 2, fail: 3 };
const rank = (s: MonthState) => RANK[s];

const CODE: Record<MonthState, string> = { pass: "p", care: "c", fail: "f", unmeasured: "u" };
const STATE_OF: Record<string, MonthState> = { p: "pass", c: "care", f: "fail", u: "unmeasured" };

/** Twelve letters for the page's data (p pass, c care, f fail, u not measured; upper case: projected). */
export const encodeStrip = (cells: StripCell[]) =>
  cells.map((c) => (c.projected ? CODE[c.state].toUpperCase() : CODE[c.state])).join("");
export function decodeStrip(code: string): StripCell[] {
  return [...code.slice(0, 12)].map((ch, i) => ({
    month: STRIP_ORDER[i],
    state: STATE_OF[ch.toLowerCase()] ?? "unmeasured",
    projected: ch !== ch.toLowerCase(),
  }));
}

/** Consecutive months (in strip order, wrapping round the year) as "Mar–Nov", "Dec, Jan, Feb" for three or fewer... */
function monthsWords(months: number[]): string {
  const set = new Set(months);
  if (set.size === 12) return "all year";
  // Start after a month not in the set, so a run across the new year stays whole.
  const start = STRIP_ORDER.findIndex((m, i) => !set.has(STRIP_ORDER[(i + 11) % 12]) && set.has(m));
  const runs: number[][] = [];
  for (let k = 0; k < 12; k++) {
    const m = STRIP_ORDER[(start + k) % 12];
    if (!set.has(m)) continue;
    const last = runs.at(-1);
    const prev = STRIP_ORDER[(start + k + 11) % 12];
    if (last && last.at(-1) === prev) last.push(m);
    else runs.push([m]);
  }
  return runs
    .map((r) =>
      r.length >= 4
        ? `${MONTH_SHORT[r[0] - 1]}–${MONTH_SHORT[r.at(-1)! - 1]}`
        : r.map((m) => MONTH_SHORT[m - 1]).join(", "),
    )
    .join(", ");
}

const PHRASE: Record<MonthState, string> = {
  fail: "fails",
  care: "asks for care",
  pass: "passes",
  unmeasured: "not measured",
};

/** The strip's accessible name: "Cold nights: fails in Dec, Jan, Feb; passes Mar–Nov". Worst first; projected months said as likely. */
export function stripLabel(rule: string, cells: StripCell[]): string {
  const parts: string[] = [];
  for (const state of ["fail", "care", "pass", "unmeasured"] as MonthState[]) {
    for (const proj of [false, true]) {
      const ms = cells.filter((c) => c.state === state && c.projected === proj).map((c) => c.month);
      if (ms.length === 0) continue;
      const verb = state === "unmeasured" ? PHRASE[state] : proj ? `likely ${PHRASE[state]}` : PHRASE[state];
      parts.push(`${verb} in ${monthsWords(ms)}${proj ? " (projected)" : ""}`.replace(" in all year", " all year"));
    }
  }
  return `${RULE_LABEL[rule] ?? rule}: ${parts.join("; ")}`;
}
