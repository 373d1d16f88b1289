import { DEFAULT_FIT_THRESHOLDS, judgeAll, type FitThresholds, type RuleLevel, type RuleResult } from "~/domain/fit/rules";
import type { PlantProfile } from "~/domain/plants/library";
import { MONTH_NAMES, MIN_DAYS_FOR_MONTH } from "~/domain/season/profile";
import type { SeasonProfile } from "~/domain/season/types";
import { windowLight, type SpotWindow } from "~/domain/fit/window-light";

export type Verdict = "thrives here" | "possible with care" | "struggles here" | "not enough data yet";

export type PlantFit = {
  plantKey: string;
  verdict: Verdict;
  /** Every rule's result, the most serious first. */
  reasons: RuleResult[];
  /** Months of the year still short of data, in the order they will come round (names, e.g. "December"). */
  missingMonths: string[];
  /** What to do about the missing months, e.g. "Leave the sensor where it is through March." */
  missingAdvice: string | null;
};

/** The verdict rule table, first match wins — exported so the page can explain it. */
export const VERDICT_RULES: { verdict: Verdict; when: string }[] = [
  {
    verdict: "struggles here",
    when: "Any rule is poor: what the sensor already measured rules the plant out, even with months still missing.",
  },
  {
    verdict: "not enough data yet",
    when: `No rule is poor, but some months of the year have fewer than ${MIN_DAYS_FOR_MONTH} days with readings.`,
  },
  { verdict: "possible with care", when: "A whole year is measured and at least one rule asks for care." },
  { verdict: "thrives here", when: "A whole year is measured and every rule is fine." },
];

/** Best first; used to rank. */
export const VERDICT_ORDER: Verdict[] = ["thrives here", "possible with care", "not enough data yet", "struggles here"];

const LEVEL_ORDER: Record<RuleLevel, number> = { poor: 0, care: 1, ok: 2 };
/** Within a level, what a grower needs to hear first: what harms, then what stops flowering, then what a tray or a blind fixes. */
const RULE_ORDER = ["cold-nights", "hot-days", "flowering", "light", "humidity", "condensation"];
const ruleRank = (r: RuleResult) => {
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
 * `window`, when given, lets a spot without a light sensor be judged on light from its window
 * facing (windowLight) instead of leaving light unjudged.
 */
export function fitPlant(profile: PlantProfile, season: SeasonProfile, thresholds: FitThresholds = DEFAULT_FIT_THRESHOLDS, window?: SpotWindow): PlantFit {
  const reasons = judgeAll(profile, season, thresholds)
    .map((r) => (r.rule === "light" && r.noData && window ? (windowLight(profile, window) ?? r) : r))
    .sort((a, b) => LEVEL_ORDER[a.level] - LEVEL_ORDER[b.level] || ruleRank(a) - ruleRank(b));
  const missing = missingMonthsOf(season);
  const levels = new Set(reasons.map((r) => r.level));
  const verdict: Verdict = levels.has("poor")
    ? "struggles here"
    : missing.length > 0
      ? "not enough data yet"
      : levels.has("care")
        ? "possible with care"
        : "thrives here";
  const missingMonths = missing.map((m) => MONTH_NAMES[m - 1]);
  return {
    plantKey: profile.key,
    verdict,
    reasons,
    missingMonths,
    missingAdvice:
      missingMonths.length === 0
        ? null
        : missingMonths.length === 12
          ? "No month has enough readings yet: leave the sensor in this spot through a whole year."
          : `Still missing ${missingMonths.length === 1 ? missingMonths[0] : `${missingMonths.slice(0, -1).join(", ")} and ${missingMonths.at(-1)}`}: leave the sensor where it is through ${missingMonths.at(-1)}.`,
  };
}

/**
 * Best first: the verdict; then fewer poor reasons; then, among those, the plant the spot misses by
 * the fewest degrees (on a frosty bench every tropical group struggles, and the hardiest should
 * head the list); then fewer care reasons and fewer missing months.
 */
type Rank = { head: number; shortfall: number; tail: number };
function fitRank(f: PlantFit): Rank {
  let poor = 0, care = 0, shortfall = 0;
  for (const r of f.reasons) {
    if (r.level === "poor") {
      poor++;
      shortfall += Math.max(0, r.shortfallC ?? 0);
    } else if (r.level === "care") care++;
  }
  return { head: VERDICT_ORDER.indexOf(f.verdict) * 16 + poor, shortfall, tail: care * 16 + f.missingMonths.length };
}
const compareRanks = (a: Rank, b: Rank) => a.head - b.head || a.shortfall - b.shortfall || a.tail - b.tail;
const byName = new Intl.Collator("en").compare;

/** Plants for one spot, best fit first; ties by name. */
export function rankPlantsForSpot(
  plants: PlantProfile[],
  season: SeasonProfile,
  thresholds: FitThresholds = DEFAULT_FIT_THRESHOLDS,
  window?: SpotWindow,
): { plant: PlantProfile; fit: PlantFit }[] {
  return plants
    .map((plant) => {
      const fit = fitPlant(plant, season, thresholds, window);
      return { plant, fit, rank: fitRank(fit) };
    })
    .sort((a, b) => compareRanks(a.rank, b.rank) || byName(a.plant.name, b.plant.name))
    .map(({ plant, fit }) => ({ plant, fit }));
}

/** Spots for one plant, best fit first; ties keep the given order. */
export function rankSpotsForPlant<S extends { season: SeasonProfile; window?: SpotWindow }>(
  plant: PlantProfile,
  spots: S[],
  thresholds: FitThresholds = DEFAULT_FIT_THRESHOLDS,
): { spot: S; fit: PlantFit }[] {
  return spots
    .map((spot) => {
      const fit = fitPlant(plant, spot.season, thresholds, spot.window);
      return { spot, fit, rank: fitRank(fit) };
    })
    .sort((a, b) => compareRanks(a.rank, b.rank))
    .map(({ spot, fit }) => ({ spot, fit }));
}
