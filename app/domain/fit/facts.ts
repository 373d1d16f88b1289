// What a fit check returns: a level and the facts behind it (numbers, dates, months), never
// sentences; the lines each check turns on (FitThresholds), a plant group's comfort and damage
// lines (linesOf), and the small helpers the checks share.
import type { PlantProfile } from "~/domain/plants/library";
import type { SeasonProfile } from "~/domain/season/types";

/** A check's level: `unknown` when it had nothing to judge (no sensor for it, no readings yet). */
export type CheckLevel = "good" | "care" | "poor" | "unknown";

/** One night or day past a line: its local date ("2026-01-17"), the extreme, and hours past the line. */
export type Episode = { date: string; valueC: number; hours: number };

export type Fact =
  // Temperature, cold side
  | { kind: "cold-ok"; comfortC: number; lowestC: number }
  | { kind: "cold-snap"; comfortC: number; damageC: number; nights: number; worst: Episode[]; degreeHours: number }
  | {
      kind: "cold-season";
      comfortC: number;
      damageC: number;
      nights: number;
      months: number[];
      typicalLowC: number;
      degreeHours: number;
    }
  | { kind: "cold-damage"; damageC: number; nights: number; worst: Episode[]; degreeHours: number }
  // Warm nights for cool growers
  | { kind: "warm-nights-ok"; maxNightC: number; warmestLowC: number }
  | { kind: "warm-nights"; maxNightC: number; nights: number; months: number[]; typicalLowC: number; season: boolean }
  // Temperature, hot side
  | { kind: "heat-ok"; comfortC: number; highestC: number }
  | {
      kind: "heat-snap";
      comfortC: number;
      damageC: number;
      days: number;
      worst: Episode[];
      degreeHours: number;
      costsSpikes: boolean;
    }
  | {
      kind: "heat-season";
      comfortC: number;
      damageC: number;
      days: number;
      months: number[];
      typicalHighC: number;
      degreeHours: number;
      costsSpikes: boolean;
    }
  | { kind: "heat-damage"; damageC: number; days: number; worst: Episode[]; degreeHours: number }
  // Humidity by its dry hours (daily minimum)
  | { kind: "humidity-ok"; minPct: number; maxPct: number; lowestDailyMinPct: number }
  | {
      kind: "humidity-dry";
      minPct: number;
      dryDays: number;
      days: number;
      months: number[];
      typicalDailyMinPct: number;
      lowestPct: number;
    }
  | { kind: "humidity-damp"; maxPct: number; months: number[]; meanPct: number }
  // Light by month
  | {
      kind: "light-months";
      minDli: number;
      maxDli: number;
      months: { month: number; dli: number }[];
      dim: number[];
      bright: number[];
      scorch: number[];
      unmeasured: number[];
    }
  | { kind: "light-clipped"; months: number[] }
  | {
      kind: "light-window";
      facing: string;
      sunnyMonths: number;
      strongSunMonths: number[];
      need: "high" | "medium" | "low";
      verdict: "shade" | "scorch" | "fits";
    }
  | {
      kind: "light-unknown";
      need: "high" | "medium" | "low";
      minDli: number;
      maxDli: number;
      reason: "no-sensor" | "outdoor";
    }
  // Flowering cues
  | { kind: "cue-none" }
  | {
      kind: "cue-met";
      maxNightC?: number;
      maxDayC?: number;
      weeks: number;
      months: number[];
      days: number;
      dryRest: boolean;
    }
  | {
      kind: "cue-missed";
      maxNightC?: number;
      maxDayC?: number;
      weeks: number;
      bestDays: number;
      cueMonths: number[];
      outOfSeason: number[];
      dryRest: boolean;
    }
  | { kind: "dif-met"; needC: number; months: { month: number; difC: number }[] }
  | { kind: "dif-missed"; needC: number; bestC: number; bestMonth: number | null }
  // Condensation
  | { kind: "condensation-ok"; hours: number; marginC: number }
  | {
      kind: "condensation-wet";
      hours: number;
      marginC: number;
      months: number[];
      worstMonth: number;
      worstShare: number;
      expected: boolean;
    }
  | { kind: "cold-glass"; months: { month: number; paneC: number; dewPointC: number }[]; uValue: number }
  // Projected months (fit/projected.ts): figures from the spot's response model played through
  // `years` past years of weather, each with its 80 % range. "likely", never certain.
  | {
      kind: "projected-cold";
      line: "damage" | "comfort" | "snap";
      lineC: number;
      months: number[];
      worstMonth: number;
      lowC: number;
      rangeC: [number, number];
      years: number;
    }
  | {
      kind: "projected-heat";
      line: "damage" | "comfort" | "snap";
      lineC: number;
      months: number[];
      worstMonth: number;
      highC: number;
      rangeC: [number, number];
      years: number;
    }
  | {
      kind: "projected-warm-nights";
      maxNightC: number;
      months: number[];
      worstMonth: number;
      lowC: number;
      rangeC: [number, number];
      years: number;
    }
  | {
      kind: "projected-humidity";
      side: "dry" | "damp";
      limitPct: number;
      months: number[];
      worstMonth: number;
      meanPct: number;
      years: number;
    }
  | { kind: "projected-ok"; side: "cold" | "heat"; months: number[]; valueC: number; lineC: number; years: number }
  | { kind: "projected-cue"; cue: "cool" | "dif"; months: number[]; years: number };

export type CheckResult = {
  rule: CheckName;
  level: CheckLevel;
  facts: Fact[];
  /** Months of the year concerned, as month-of-year keys "01"–"12" (the year strip's columns). */
  months?: string[];
  /** Set when the rule had nothing to judge (no sensor for it, or no readings yet). */
  noData?: boolean;
  /** How far the spot misses: degree-hours past the damage line and past the comfort line. */
  miss?: { damage: number; comfort: number };
  /** What the result rests on: measured months (also when absent), projected months, or both (fit/projected.ts). */
  confidence?: "measured" | "projected" | "mixed";
  /** Set when projected months alone would have made this poor: it is a likely warning at care level instead. */
  likely?: "poor";
};

export type CheckName =
  "cold-nights" | "warm-nights" | "hot-days" | "humidity" | "light" | "flowering" | "condensation";

/** Where each rule turns; our own choices (common practice) unless noted. Kept as data so a page can show them. */
export type FitThresholds = {
  /**
   * A cheap sensor reads to about ±0.5 °C (DHT22 and SHT3x data sheets): a night within this of a
   * comfort line is not counted past it.
   */
  sensorMarginC: number;
  /** A season: at least this many nights (or days) past the comfort line within `seasonWindowDays`. */
  seasonNights: number;
  seasonWindowDays: number;
  /** A month's daily humidity minimum under the group's minimum on this share of its days asks for care. */
  dryDayShare: number;
  /**
   * The DLI band's edges are soft (group ranges from memory): a month counts as dim under
   * dliMin × (1 − this) and bright over dliMax × (1 + this).
   */
  lightEdgeShare: number;
  /** A month with mean DLI under dliMin ÷ this, or over dliMax × this, is far off. */
  lightFarFactor: number;
  /** Months far too bright (scorch) for a low-light group before it is poor. */
  scorchPoorMonths: number;
  /** A month whose share of time near the dew point reaches this asks for care. */
  condensationCareShare: number;
  /** A cool spell counts when this share of the days in the window qualify. */
  coolSpellShare: number;
  /** A month's day–night difference counts with at least this many days behind it. */
  difMinDays: number;
};

export const DEFAULT_FIT_THRESHOLDS: FitThresholds = {
  sensorMarginC: 0.5,
  seasonNights: 10,
  seasonWindowDays: 28,
  dryDayShare: 0.25,
  lightEdgeShare: 0.2,
  lightFarFactor: 1.5,
  scorchPoorMonths: 3,
  condensationCareShare: 0.1,
  coolSpellShare: 0.8,
  difMinDays: 10,
};

export type FitCheck = (profile: PlantProfile, season: SeasonProfile, thresholds: FitThresholds) => CheckResult;

const LEVEL_RANK: Record<CheckLevel, number> = { good: 0, unknown: 1, care: 2, poor: 3 };
export const worstLevel = (levels: CheckLevel[]): CheckLevel =>
  levels.reduce<CheckLevel>((w, l) => (LEVEL_RANK[l] > LEVEL_RANK[w] ? l : w), "good");

/** The group's lines, with defaults for profiles that don't name them (a site's own profiles). */
export function linesOf(p: PlantProfile) {
  return {
    comfortNightC: p.minNightC,
    damageNightC: p.damageNightC ?? p.minNightC - 4,
    comfortDayC: p.maxDayC,
    damageDayC: p.damageDayC ?? p.maxDayC + 4,
    maxNightC: p.maxNightC,
  };
}

/** The genus or group as a grower says it: "Phalaenopsis (moth orchid)" → "Phalaenopsis". */
export function shortName(profile: PlantProfile): string {
  return profile.name.split(/[ ,(]/)[0];
}

export const monthKeyOf = (month: number) => String(month).padStart(2, "0");

/** Months 1–12 in the order a grower reads them: starting after the longest gap of the year. */
export function cyclicOrder(months: number[]): number[] {
  const sorted = [...new Set(months)].sort((a, b) => a - b);
  if (sorted.length <= 1) return sorted;
  let start = 0,
    widest = -1;
  for (let i = 0; i < sorted.length; i++) {
    const prev = sorted[(i - 1 + sorted.length) % sorted.length];
    const gap = (sorted[i] - prev + 12) % 12 || 12;
    if (gap > widest) {
      widest = gap;
      start = i;
    }
  }
  return [...sorted.slice(start), ...sorted.slice(0, start)];
}

export const monthKeys = (months: number[]) => cyclicOrder(months).map(monthKeyOf);
export const median = (xs: number[]) => {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
};
export const round1 = (x: number) => Math.round(x * 10) / 10;

/** Months in which the hemisphere's cue months fall: northern months shifted six in the south. */
export const hemisphereMonths = (months: number[], season: SeasonProfile) =>
  season.hemisphere === "southern" ? months.map((m) => ((m + 5) % 12) + 1) : months;

export const unknown = (rule: CheckName): CheckResult => ({ rule, level: "unknown", noData: true, facts: [] });
