// The fit rules on projected months (issue 16, part 4): months a spot has not measured yet are
// judged from its projection (domain/projection/project.ts), month by month, against the same
// comfort and damage lines as the measured nights and days. Facts, not sentences (describe.ts
// words them). A projection never rules a plant out with the certainty of a measurement: what
// would be poor on projected months alone is a warning at care level, worded as likely.
import {
  type FitThresholds,
  type CheckLevel,
  type CheckName,
  type CheckResult,
  cyclicOrder,
  linesOf,
  monthKeyOf,
} from "~/domain/fit/facts";
import type { PlantProfile } from "~/domain/plants/library";
import type { ProjectedMonth } from "~/domain/projection/project";
import type { SeasonProfile } from "~/domain/season/types";
import { cold, flowering, heat, humidity, warm, type Judged } from "~/domain/fit/projected-judges";

/** What a verdict or one reason rests on: measured months only, projected months only, or both. */
export type Confidence = "measured" | "projected" | "mixed";

/** The projection a fit may fill its unmeasured months from (see fitProjection in .server/projections.ts). */
export type FitProjection = {
  /** The months to fill: those of the judged period without enough measured days (projected or blended). */
  months: ProjectedMonth[];
  /** Past years of weather the projection played through. */
  years: number;
  /** Local date ("YYYY-MM-DD") by which every month will have been measured, if the sensor stays. */
  firmBy: string | null;
};

/** What a verdict rests on: months measured and projected, and when it will be firm. */
export type FitBasis = {
  confidence: Confidence;
  /** Months of the year with enough measured days. */
  measuredMonths: number[];
  /** Months filled from the projection (partly measured months among them: `blendedMonths`). */
  projectedMonths: number[];
  blendedMonths: number[];
  years: number;
  firmBy: string | null;
};

const ORDER: CheckLevel[] = ["good", "unknown", "care", "poor"];
const worse = (a: CheckLevel, b: CheckLevel) => (ORDER.indexOf(b) > ORDER.indexOf(a) ? b : a);

/**
 * One rule's measured result merged with its judgement on the projected months. Measured poor
 * stands as it is. A projected finding is capped at care (likely, not certain) and sets the
 * reason's confidence to projected when it is what sets the level; a good reason judged on both
 * measured and projected months is mixed.
 */
function merge(measured: CheckResult, projected: Judged, rule: CheckName): CheckResult {
  const m = measured.noData ? null : measured;
  const pLevel: CheckLevel = projected.level === "poor" ? "care" : projected.level;
  // Month keys in reading order, once per judgement (a fit table merges each judgement many times).
  const own = (projected.monthKeys ??= cyclicOrder(projected.months).map(monthKeyOf));
  if (rule === "flowering") {
    // A cue likely met on projected months lifts a measured miss (or no data) to good.
    if (!m || m.level !== "good")
      return { rule, level: "good", facts: projected.facts, months: own, confidence: "projected" };
    return { ...m, facts: [...m.facts, ...projected.facts], confidence: "mixed" };
  }
  if (!m)
    return {
      rule,
      level: pLevel,
      facts: projected.facts,
      months: own,
      confidence: "projected",
      ...(projected.level === "poor" ? { likely: "poor" as const } : {}),
    };
  const level = worse(m.level, pLevel);
  const confidence: Confidence =
    level === "good" ? "mixed" : ORDER.indexOf(pLevel) > ORDER.indexOf(m.level) ? "projected" : "measured";
  return {
    ...m,
    level,
    // What sets the level comes first: the projected warning before the measured months' all-clear.
    facts:
      confidence === "projected"
        ? [...projected.facts.filter((f) => f.kind !== "projected-ok"), ...m.facts]
        : [...m.facts, ...projected.facts.filter((f) => f.kind !== "projected-ok" || level === "good")],
    months: !m.months?.length
      ? own
      : own.length === 0
        ? m.months
        : cyclicOrder([...m.months.map(Number), ...projected.months]).map(monthKeyOf),
    confidence,
    ...(confidence === "projected" && projected.level === "poor" ? { likely: "poor" as const } : {}),
  };
}

// A fit table judges many plants alike in what a rule reads (fit/checks.ts CHECK_INPUTS): each
// projection's judgement is kept per rule and plant inputs, and each merge per pair of results.
type JudgeKey = (p: PlantProfile) => string;
const JUDGES: {
  rule: CheckName;
  key: JudgeKey;
  judge: (
    p: PlantProfile,
    months: ProjectedMonth[],
    years: number,
    t: FitThresholds,
    season: SeasonProfile,
  ) => Judged | null;
}[] = [
  {
    rule: "cold-nights",
    key: (p) => `${p.minNightC}|${linesOf(p).damageNightC}`,
    judge: (p, m, y, t) => cold(p, m, y, t),
  },
  { rule: "hot-days", key: (p) => `${p.maxDayC}|${linesOf(p).damageDayC}`, judge: (p, m, y, t) => heat(p, m, y, t) },
  { rule: "warm-nights", key: (p) => `${p.maxNightC}`, judge: (p, m, y, t) => warm(p, m, y, t) },
  { rule: "humidity", key: (p) => `${p.humidityMin}|${p.humidityMax}`, judge: (p, m, y) => humidity(p, m, y) },
  { rule: "flowering", key: (p) => JSON.stringify(p.flowering), judge: (p, m, y, t, s) => flowering(p, m, y, s, t) },
];
const judgedCache = new WeakMap<FitProjection, WeakMap<FitThresholds, Map<string, Judged | null>>>();
const mergedCache = new WeakMap<CheckResult, Map<Judged, CheckResult>>();
/** Each plant's key per judge, built once per plant profile. */
const plantKeys = new WeakMap<PlantProfile, string[]>();

/** Each measured rule result joined with the projected months' judgement of the same rule. */
export function withProjection(
  profile: PlantProfile,
  season: SeasonProfile,
  reasons: CheckResult[],
  projection: FitProjection,
  t: FitThresholds,
): CheckResult[] {
  let byT = judgedCache.get(projection);
  if (!byT) judgedCache.set(projection, (byT = new WeakMap()));
  let known = byT.get(t);
  if (!known) byT.set(t, (known = new Map()));
  let keys = plantKeys.get(profile);
  if (!keys) plantKeys.set(profile, (keys = JUDGES.map((j) => `${j.rule}|${j.key(profile)}`)));
  return reasons.map((r) => {
    const i = JUDGES.findIndex((x) => x.rule === r.rule);
    if (i < 0) return r; // not judged on projected months: rests on the measured months (confidence absent = measured)
    const j = JUDGES[i];
    const key = keys[i];
    let judged = known.get(key);
    if (judged === undefined)
      known.set(key, (judged = j.judge(profile, projection.months, projection.years, t, season)));
    if (!judged || (r.level === "poor" && !r.noData)) return r;
    let merges = mergedCache.get(r);
    if (!merges) mergedCache.set(r, (merges = new Map()));
    let out = merges.get(judged);
    if (!out) merges.set(judged, (out = merge(r, judged, r.rule)));
    return out;
  });
}

/** What the verdict rests on. Null when nothing was filled from a projection. */
export function basisOf(season: SeasonProfile, projection: FitProjection | undefined): FitBasis | null {
  if (!projection || projection.months.length === 0) return null;
  const measuredMonths = season.year.filter((m) => m.coverage.enough).map((m) => m.month);
  return {
    confidence: measuredMonths.length === 0 ? "projected" : "mixed",
    measuredMonths,
    projectedMonths: projection.months.map((m) => m.month),
    blendedMonths: projection.months.filter((m) => m.source === "blended").map((m) => m.month),
    years: projection.years,
    firmBy: projection.firmBy,
  };
}
