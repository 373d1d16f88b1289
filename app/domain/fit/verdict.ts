import {
  DEFAULT_FIT_THRESHOLDS,
  linesOf,
  type FitThresholds,
  type CheckLevel,
  type CheckResult,
} from "~/domain/fit/facts";
import { judgeAll } from "~/domain/fit/checks";
import type { PlantProfile } from "~/domain/plants/library";
import { MONTH_NAMES } from "~/domain/season/profile";
import { MIN_DAYS_FOR_MONTH } from "~/domain/season/thresholds";
import type { SeasonProfile } from "~/domain/season/types";
import { windowLight, type SpotWindow } from "~/domain/fit/window-light";
import { coldGlass, type GlassContext } from "~/domain/fit/cold-glass";
import { basisOf, withProjection, type Confidence, type FitBasis, type FitProjection } from "~/domain/fit/projected";

export type Verdict =
  "thrives here" | "possible with care" | "good for part of the year" | "struggles here" | "not enough data yet";

/** The stable code of a verdict, for the API: good, care, poor, unknown. */
export type FitLevel = "good" | "care" | "poor" | "unknown";
export const VERDICT_LEVEL: Record<Verdict, FitLevel> = {
  "thrives here": "good",
  "possible with care": "care",
  "good for part of the year": "care",
  "struggles here": "poor",
  "not enough data yet": "unknown",
};

/** Months a spot that rules a group out year-round suits it, and the night to bring it in before. */
export type SeasonalUse = { months: number[]; bringInBelowC: number };

export type PlantFit = {
  plantKey: string;
  verdict: Verdict;
  level: FitLevel;
  /** Every rule's result, the most serious first. */
  reasons: CheckResult[];
  /** Set when the spot suits the group for a run of months though not all year (a summer bench). */
  seasonal: SeasonalUse | null;
  /** How far the spot misses the group, summed over the temperature rules: degree-hours past damage and past comfort. */
  miss: { damage: number; comfort: number };
  /** Months of the year still short of data, in the order they will come round (names, e.g. "December"). */
  missingMonths: string[];
  /** What to do about the missing months, e.g. "Leave the sensor where it is through March." */
  missingAdvice: string | null;
  /**
   * What the verdict rests on: measured months only; or, with a projection filling the months not
   * measured yet, projected or mixed ("likely"), with the months and the date it will be firm.
   */
  confidence: Confidence;
  basis: FitBasis | null;
};

/** The verdict rule table, first match wins — exported so the page can explain it. */
export const VERDICT_RULES: { verdict: Verdict; when: string }[] = [
  {
    verdict: "struggles here",
    when:
      "A rule is poor: the spot crossed the group's damage line, or " +
      "held it past its comfort range for a season (or stopped its " +
      "growth), even with months still missing — unless it suits the " +
      "group for a run of months.",
  },
  {
    verdict: "good for part of the year",
    when:
      "An outdoor spot rules the group out over the year, but suits " +
      "it for a run of two or more months: use it then and bring the " +
      "plant in before nights fall under its comfort line.",
  },
  {
    verdict: "not enough data yet",
    when: `No rule is poor, but some months of the year have fewer than ${MIN_DAYS_FOR_MONTH} days with readings.`,
  },
  {
    verdict: "possible with care",
    when: "A whole year is measured and at least one rule asks for care — a brief cold snap, dry hours, a missed flowering cue — or light is not known.",
  },
  { verdict: "thrives here", when: "A whole year is measured, every rule is fine and light is known to suit." },
];

/** Best first; used to rank. */
export const VERDICT_ORDER: Verdict[] = [
  "thrives here",
  "possible with care",
  "good for part of the year",
  "not enough data yet",
  "struggles here",
];

const LEVEL_ORDER: Record<CheckLevel, number> = { poor: 0, care: 1, unknown: 2, good: 3 };
/** Within a level, what a grower needs to hear first: what harms, then what stops flowering, then what a tray or a blind fixes. */
const RULE_ORDER = ["cold-nights", "hot-days", "warm-nights", "flowering", "light", "humidity", "condensation"];
const ruleRank = (r: CheckResult) => {
  const i = RULE_ORDER.indexOf(r.rule);
  return i < 0 ? RULE_ORDER.length : i;
};

const missingCache = new WeakMap<SeasonProfile, number[]>();
function missingMonthsOf(season: SeasonProfile): number[] {
  const known = missingCache.get(season);
  if (known) return known;
  const missing = new Set(season.year.filter((m) => !m.coverage.enough).map((m) => m.month));
  // Count from the month of the last reading (for a sensor still in place, this month) onwards.
  const start = season.days.at(-1)?.month ?? season.months.at(-1)?.month ?? 1;
  const months = Array.from({ length: 12 }, (_, i) => ((start - 1 + i) % 12) + 1).filter((m) => missing.has(m));
  missingCache.set(season, months);
  return months;
}

/**
 * The longest run of measured months (two or more) in which the spot suits the group on temperature:
 * at most five nights under the comfort night (beyond the sensor's margin) and none under the
 * bring-in line, at most five days over the comfortable day and none past the heat damage line, at
 * most five warm nights for a cool grower.
 */
export function seasonalUse(
  profile: PlantProfile,
  season: SeasonProfile,
  t: FitThresholds = DEFAULT_FIT_THRESHOLDS,
): SeasonalUse | null {
  const l = linesOf(profile);
  // A plant summered outdoors rides out a few nights under its comfort line (REFERENCES.md: cool
  // growers stay out through nights a little under 10 °C); it comes in before nights reach halfway
  // to its damage line.
  const bringIn = Math.round(((l.comfortNightC + l.damageNightC) / 2) * 2) / 2;
  const measured = new Set(season.year.filter((m) => m.coverage.enough).map((m) => m.month));
  const ok = new Set<number>();
  for (const m of measured) {
    const nights = season.nights.filter((n) => n.month === m);
    const days = season.days.filter((d) => d.month === m && d.high !== null);
    const cold = nights.filter((n) => n.low < l.comfortNightC - t.sensorMarginC).length;
    const damaged =
      nights.some((n) => n.low < bringIn) ||
      days.some((d) => d.high! > l.damageDayC || (d.low ?? Infinity) < l.damageNightC);
    const hot = days.filter((d) => d.high! > l.comfortDayC + t.sensorMarginC).length;
    const maxNight = l.maxNightC;
    const warm = maxNight === undefined ? 0 : nights.filter((n) => n.low > maxNight + t.sensorMarginC).length;
    if (!damaged && cold <= 5 && hot <= 5 && warm <= 5) ok.add(m);
  }
  if (ok.size === 0 || ok.size === 12) return null;
  // Longest cyclic run.
  let best: number[] = [];
  for (const start of ok) {
    if (ok.has(((start + 10) % 12) + 1)) continue; // not the start of a run
    const run: number[] = [];
    for (let m = start; ok.has(m) && run.length < 12; m = (m % 12) + 1) run.push(m);
    if (run.length > best.length) best = run;
  }
  return best.length >= 2 ? { months: best, bringInBelowC: bringIn } : null;
}

/** `projection` fills the months of the period not measured yet (fit/projected.ts). */
// Measured months always win: a projected month the season has measured is never judged. Kept
// per season and projection, so a fit table's plants share one filtered projection (and its cache).
const unmeasuredCache = new WeakMap<
  SeasonProfile,
  WeakMap<FitProjection, { projection: FitProjection; basis: FitBasis | null }>
>();
function unmeasured(
  season: SeasonProfile,
  projection: FitProjection,
): { projection: FitProjection; basis: FitBasis | null } {
  let bySeason = unmeasuredCache.get(season);
  if (!bySeason) unmeasuredCache.set(season, (bySeason = new WeakMap()));
  let hit = bySeason.get(projection);
  if (!hit) {
    const p = { ...projection, months: projection.months.filter((m) => !season.year[m.month - 1]?.coverage.enough) };
    bySeason.set(projection, (hit = { projection: p, basis: basisOf(season, p) }));
  }
  return hit;
}

export type FitContext = { window?: SpotWindow; glass?: GlassContext; projection?: FitProjection };

/**
 * `context.window`, when given, lets a spot without a light sensor be judged on light from its
 * window facing (windowLight); `context.glass` adds the cold-glass check for a windowsill.
 */
export function fitPlant(
  profile: PlantProfile,
  season: SeasonProfile,
  thresholds: FitThresholds = DEFAULT_FIT_THRESHOLDS,
  context: FitContext | SpotWindow = {},
): PlantFit {
  const ctx: FitContext = "facing" in context ? { window: context } : context;
  const judgedReasons = judgeAll(profile, season, thresholds)
    .filter((r) => r.facts.length > 0 || r.noData)
    .map((r) => (r.rule === "light" && r.noData && ctx.window ? windowLight(profile, ctx.window) : r))
    .map((r) => (r.rule === "condensation" && ctx.glass ? coldGlass(r, season, ctx.glass) : r));
  const filled = ctx.projection ? unmeasured(season, ctx.projection) : null;
  const projection = filled?.projection;
  const basis = filled?.basis ?? null;
  const reasons = (basis ? withProjection(profile, season, judgedReasons, projection!, thresholds) : judgedReasons)
    .filter((r) => r.facts.length > 0 || r.noData)
    .sort((a, b) => LEVEL_ORDER[a.level] - LEVEL_ORDER[b.level] || ruleRank(a) - ruleRank(b));
  const missing = missingMonthsOf(season);
  // Months the projection fills no longer hold the verdict back; they stay listed as not measured.
  const projectedMonths = new Set(basis?.projectedMonths ?? []);
  const unfilled = missing.filter((m) => !projectedMonths.has(m));
  const levels = new Set(reasons.map((r) => r.level));
  // Seasonal use is for spots a plant can be carried out to and back in: outdoors.
  const seasonal =
    levels.has("poor") && ctx.window && !ctx.window.indoor ? seasonalUse(profile, season, thresholds) : null;
  const verdict: Verdict = levels.has("poor")
    ? seasonal
      ? "good for part of the year"
      : "struggles here"
    : unfilled.length > 0
      ? "not enough data yet"
      : levels.has("care") || levels.has("unknown")
        ? "possible with care"
        : "thrives here";
  const miss = { damage: 0, comfort: 0 };
  for (const r of reasons) {
    miss.damage += r.miss?.damage ?? 0;
    miss.comfort += r.miss?.comfort ?? 0;
  }
  const missingMonths = missing.map((m) => MONTH_NAMES[m - 1]);
  // A verdict ruled by a measured poor rests on the measurement; any other rests on every month judged.
  const confidence: Confidence =
    !basis || (levels.has("poor") && verdict === "struggles here") ? "measured" : basis.confidence;
  return {
    plantKey: profile.key,
    verdict,
    level: VERDICT_LEVEL[verdict],
    confidence,
    basis,
    reasons,
    seasonal,
    miss: { damage: Math.round(miss.damage), comfort: Math.round(miss.comfort) },
    missingMonths,
    missingAdvice:
      missingMonths.length === 0
        ? null
        : missingMonths.length === 12
          ? "No month has enough readings yet: leave the sensor in this spot through a whole year."
          : `Still missing ` +
            `${missingMonths.length === 1 ? missingMonths[0] : `${missingMonths.slice(0, -1).join(", ")} and ${missingMonths.at(-1)}`}` +
            `: leave the sensor where it is through ${missingMonths.at(-1)}.`,
  };
}

/**
 * Best first: the verdict; then how far the spot misses the group — degree-hours past its damage
 * lines, then past its comfort lines (on a frosty bench every tropical group struggles, and the
 * hardiest heads the list) — then the rules asking for care, weighted (CARE_WEIGHT), and fewer missing months. Not the
 * count of failed rules: one hard frost outweighs three small cautions.
 */
type Rank = { verdict: number; damage: number; comfort: number; tail: number };
/** What a rule asking for care costs in the ranking: what a tray or a fan fixes costs less than heat, cold, light or flowers. */
const CARE_WEIGHT: Record<string, number> = { humidity: 1, condensation: 1 };
function fitRank(f: PlantFit): Rank {
  let care = 0;
  for (const r of f.reasons)
    if (r.level === "care" || r.level === "unknown") care += r.level === "unknown" ? 1 : (CARE_WEIGHT[r.rule] ?? 2);
  return {
    verdict: VERDICT_ORDER.indexOf(f.verdict),
    damage: f.miss.damage,
    comfort: f.miss.comfort,
    tail: care * 16 + f.missingMonths.length,
  };
}
const compareRanks = (a: Rank, b: Rank) =>
  a.verdict - b.verdict || a.damage - b.damage || a.comfort - b.comfort || a.tail - b.tail;
const byName = new Intl.Collator("en").compare;

/** Plants for one spot, best fit first; ties by name. */
export function rankPlantsForSpot(
  plants: PlantProfile[],
  season: SeasonProfile,
  thresholds: FitThresholds = DEFAULT_FIT_THRESHOLDS,
  context: FitContext | SpotWindow = {},
): { plant: PlantProfile; fit: PlantFit }[] {
  return plants
    .map((plant) => {
      const fit = fitPlant(plant, season, thresholds, context);
      return { plant, fit, rank: fitRank(fit) };
    })
    .sort((a, b) => compareRanks(a.rank, b.rank) || byName(a.plant.name, b.plant.name))
    .map(({ plant, fit }) => ({ plant, fit }));
}

/** Spots for one plant, best fit first; ties keep the given order. */
export function rankSpotsForPlant<
  S extends { season: SeasonProfile; window?: SpotWindow; glass?: GlassContext; projection?: FitProjection },
>(plant: PlantProfile, spots: S[], thresholds: FitThresholds = DEFAULT_FIT_THRESHOLDS): { spot: S; fit: PlantFit }[] {
  return spots
    .map((spot) => {
      const fit = fitPlant(plant, spot.season, thresholds, {
        window: spot.window,
        glass: spot.glass,
        projection: spot.projection,
      });
      return { spot, fit, rank: fitRank(fit) };
    })
    .sort((a, b) => compareRanks(a.rank, b.rank))
    .map(({ spot, fit }) => ({ spot, fit }));
}
