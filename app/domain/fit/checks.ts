// The fit rules: each judges one side of a spot's season against a plant group and returns a level
// and the facts behind it (numbers, dates, months) — never sentences. describe.ts turns the facts
// into words in the grower's unit; the JSON route returns them as they are.
//
// The model: every limit has two lines, a comfort line (the group grows well inside it) and a damage
// line (the plant is harmed past it), and what counts is how long and how far the spot goes past
// each: degree-hours, nights, and whether it is a brief snap or a season of weeks.
import type { PlantProfile } from "~/domain/plants/library";
import { CONDENSATION_MARGIN_C } from "~/domain/season/thresholds";
import type { MonthOfYearProfile, NightSummary, SeasonProfile } from "~/domain/season/types";

/** A rule's level: `unknown` when it had nothing to judge (no sensor for it, no readings yet). */
export type RuleLevel = "good" | "care" | "poor" | "unknown";

/** One night or day past a line: its local date ("2026-01-17"), the extreme, and hours past the line. */
export type Episode = { date: string; valueC: number; hours: number };

export type Fact =
  // Temperature, cold side
  | { kind: "cold-ok"; comfortC: number; lowestC: number }
  | { kind: "cold-snap"; comfortC: number; damageC: number; nights: number; worst: Episode[]; degreeHours: number }
  | { kind: "cold-season"; comfortC: number; damageC: number; nights: number; months: number[]; typicalLowC: number; degreeHours: number }
  | { kind: "cold-damage"; damageC: number; nights: number; worst: Episode[]; degreeHours: number }
  // Warm nights for cool growers
  | { kind: "warm-nights-ok"; maxNightC: number; warmestLowC: number }
  | { kind: "warm-nights"; maxNightC: number; nights: number; months: number[]; typicalLowC: number; season: boolean }
  // Temperature, hot side
  | { kind: "heat-ok"; comfortC: number; highestC: number }
  | { kind: "heat-snap"; comfortC: number; damageC: number; days: number; worst: Episode[]; degreeHours: number; costsSpikes: boolean }
  | { kind: "heat-season"; comfortC: number; damageC: number; days: number; months: number[]; typicalHighC: number; degreeHours: number; costsSpikes: boolean }
  | { kind: "heat-damage"; damageC: number; days: number; worst: Episode[]; degreeHours: number }
  // Humidity by its dry hours (daily minimum)
  | { kind: "humidity-ok"; minPct: number; maxPct: number; lowestDailyMinPct: number }
  | { kind: "humidity-dry"; minPct: number; dryDays: number; days: number; months: number[]; typicalDailyMinPct: number; lowestPct: number }
  | { kind: "humidity-damp"; maxPct: number; months: number[]; meanPct: number }
  // Light by month
  | { kind: "light-months"; minDli: number; maxDli: number; months: { month: number; dli: number }[]; dim: number[]; bright: number[]; scorch: number[]; unmeasured: number[] }
  | { kind: "light-clipped"; months: number[] }
  | { kind: "light-window"; facing: string; sunnyMonths: number; strongSunMonths: number[]; need: "high" | "medium" | "low"; verdict: "shade" | "scorch" | "fits" }
  | { kind: "light-unknown"; need: "high" | "medium" | "low"; minDli: number; maxDli: number; reason: "no-sensor" | "outdoor" }
  // Flowering cues
  | { kind: "cue-none" }
  | { kind: "cue-met"; maxNightC?: number; maxDayC?: number; weeks: number; months: number[]; days: number; dryRest: boolean }
  | { kind: "cue-missed"; maxNightC?: number; maxDayC?: number; weeks: number; bestDays: number; cueMonths: number[]; outOfSeason: number[]; dryRest: boolean }
  | { kind: "dif-met"; needC: number; months: { month: number; difC: number }[] }
  | { kind: "dif-missed"; needC: number; bestC: number; bestMonth: number | null }
  // Condensation
  | { kind: "condensation-ok"; hours: number; marginC: number }
  | { kind: "condensation-wet"; hours: number; marginC: number; months: number[]; worstMonth: number; worstShare: number; expected: boolean }
  | { kind: "cold-glass"; months: { month: number; paneC: number; dewPointC: number }[]; uValue: number }
  // Projected months (fit/projected.ts): figures from the spot's response model played through
  // `years` past years of weather, each with its 80 % range. "likely", never certain.
  | { kind: "projected-cold"; line: "damage" | "comfort" | "snap"; lineC: number; months: number[]; worstMonth: number; lowC: number; rangeC: [number, number]; years: number }
  | { kind: "projected-heat"; line: "damage" | "comfort" | "snap"; lineC: number; months: number[]; worstMonth: number; highC: number; rangeC: [number, number]; years: number }
  | { kind: "projected-warm-nights"; maxNightC: number; months: number[]; worstMonth: number; lowC: number; rangeC: [number, number]; years: number }
  | { kind: "projected-humidity"; side: "dry" | "damp"; limitPct: number; months: number[]; worstMonth: number; meanPct: number; years: number }
  | { kind: "projected-ok"; side: "cold" | "heat"; months: number[]; valueC: number; lineC: number; years: number }
  | { kind: "projected-cue"; cue: "cool" | "dif"; months: number[]; years: number };

export type RuleResult = {
  rule: RuleName;
  level: RuleLevel;
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

export type RuleName = "cold-nights" | "warm-nights" | "hot-days" | "humidity" | "light" | "flowering" | "condensation";

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

export type FitRule = (profile: PlantProfile, season: SeasonProfile, thresholds: FitThresholds) => RuleResult;

const LEVEL_RANK: Record<RuleLevel, number> = { good: 0, unknown: 1, care: 2, poor: 3 };
export const worstLevel = (levels: RuleLevel[]): RuleLevel =>
  levels.reduce<RuleLevel>((w, l) => (LEVEL_RANK[l] > LEVEL_RANK[w] ? l : w), "good");

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
  let start = 0, widest = -1;
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

const monthKeys = (months: number[]) => cyclicOrder(months).map(monthKeyOf);
const median = (xs: number[]) => {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
};
const round1 = (x: number) => Math.round(x * 10) / 10;

/** Months in which the hemisphere's cue months fall: northern months shifted six in the south. */
export const hemisphereMonths = (months: number[], season: SeasonProfile) =>
  season.hemisphere === "southern" ? months.map((m) => ((m + 5) % 12) + 1) : months;

const unknown = (rule: RuleName): RuleResult => ({ rule, level: "unknown", noData: true, facts: [] });

/** The most items (by day number) in any window of `width` days. */
function densestWindow(dayNumbers: number[], width: number): number {
  let best = 0;
  for (let i = 0, j = 0; i < dayNumbers.length; i++) {
    while (dayNumbers[i] - dayNumbers[j] >= width) j++;
    best = Math.max(best, i - j + 1);
  }
  return best;
}

const hoursUnder = (temps: number[] | undefined, line: number) => (temps ?? []).filter((t) => t < line).length;
const degreeHoursUnder = (temps: number[] | undefined, line: number, low: number) =>
  temps && temps.length ? temps.reduce((n, t) => n + Math.max(0, line - t), 0) : Math.max(0, line - low);
const hoursOver = (temps: number[] | undefined, line: number) => (temps ?? []).filter((t) => t > line).length;
const degreeHoursOver = (temps: number[] | undefined, line: number, high: number) =>
  temps && temps.length ? temps.reduce((n, t) => n + Math.max(0, t - line), 0) : Math.max(0, high - line);

const worstNights = (nights: NightSummary[], line: number, n = 3): Episode[] =>
  [...nights]
    .sort((a, b) => a.low - b.low || a.dayNumber - b.dayNumber)
    .slice(0, n)
    .map((x) => ({ date: x.key, valueC: round1(x.low), hours: Math.max(1, hoursUnder(x.temps, line)) }));

const lowestCache = new WeakMap<SeasonProfile, number>();
/** The lowest reading of nights and days: a cold snap at 9 in the morning still chills. */
function lowestOf(season: SeasonProfile): number {
  let lowest = lowestCache.get(season);
  if (lowest === undefined) {
    lowest = Infinity;
    for (const n of season.nights) lowest = Math.min(lowest, n.low);
    for (const d of season.days) if (d.low !== null) lowest = Math.min(lowest, d.low);
    lowestCache.set(season, lowest);
  }
  return lowest;
}

/**
 * Nights against the comfort night and the cold damage line. Past damage → poor. Past comfort for a
 * season (many nights within weeks) → care, or poor when the season's typical night sits nearer the
 * damage line than the comfort line. A few nights past comfort (a snap) → care, naming the nights.
 */
export const coldNights: FitRule = (profile, season, t) => {
  if (season.nights.length === 0) return unknown("cold-nights");
  const { comfortNightC: comfort, damageNightC: damage } = linesOf(profile);
  const lowest = lowestOf(season);
  const cold = season.nights.filter((n) => n.low < comfort - t.sensorMarginC);
  let comfortDh = 0;
  for (const n of cold) comfortDh += degreeHoursUnder(n.temps, comfort, n.low);
  const damaged = season.nights.filter((n) => n.low < damage);
  let damageDh = 0;
  for (const n of damaged) damageDh += degreeHoursUnder(n.temps, damage, n.low);
  const miss = { damage: round1(damageDh), comfort: round1(comfortDh) };
  if (damaged.length > 0) {
    return {
      rule: "cold-nights",
      level: "poor",
      months: monthKeys(damaged.map((n) => n.month)),
      miss,
      facts: [{ kind: "cold-damage", damageC: damage, nights: damaged.length, worst: worstNights(damaged, damage), degreeHours: round1(damageDh) }],
    };
  }
  if (cold.length === 0) return { rule: "cold-nights", level: "good", miss, facts: [{ kind: "cold-ok", comfortC: comfort, lowestC: round1(lowest) }] };
  const isSeason = densestWindow(cold.map((n) => n.dayNumber), t.seasonWindowDays) >= t.seasonNights;
  if (!isSeason) {
    return {
      rule: "cold-nights",
      level: "care",
      months: monthKeys(cold.map((n) => n.month)),
      miss,
      facts: [{ kind: "cold-snap", comfortC: comfort, damageC: damage, nights: cold.length, worst: worstNights(cold, comfort), degreeHours: round1(comfortDh) }],
    };
  }
  // The season's months: those with a season's worth of cold nights (pro rata), else all cold months.
  const byMonth = new Map<number, NightSummary[]>();
  for (const n of cold) byMonth.set(n.month, [...(byMonth.get(n.month) ?? []), n]);
  let months = [...byMonth.entries()].filter(([, ns]) => ns.length >= t.seasonNights / 2).map(([m]) => m);
  if (months.length === 0) months = [...byMonth.keys()];
  const typical = median(cold.filter((n) => months.includes(n.month)).map((n) => n.low));
  return {
    rule: "cold-nights",
    level: typical < (comfort + damage) / 2 ? "poor" : "care",
    months: monthKeys(months),
    miss,
    facts: [{ kind: "cold-season", comfortC: comfort, damageC: damage, nights: cold.length, months: cyclicOrder(months), typicalLowC: round1(typical), degreeHours: round1(comfortDh) }],
  };
};

/**
 * Warm nights for groups with a maximum night (cool growers): a season of nights above it stops
 * growth or flowering — poor when the season's typical night is 2 °C or more above it, else care.
 */
export const warmNights: FitRule = (profile, season, t) => {
  const { maxNightC } = linesOf(profile);
  if (maxNightC === undefined) return { rule: "warm-nights", level: "good", facts: [] };
  if (season.nights.length === 0) return unknown("warm-nights");
  const warm = season.nights.filter((n) => n.low > maxNightC + t.sensorMarginC);
  const warmest = Math.max(...season.nights.map((n) => n.low));
  if (warm.length === 0) return { rule: "warm-nights", level: "good", facts: [{ kind: "warm-nights-ok", maxNightC, warmestLowC: round1(warmest) }] };
  const isSeason = densestWindow(warm.map((n) => n.dayNumber), t.seasonWindowDays) >= t.seasonNights;
  const typical = median(warm.map((n) => n.low));
  const months = cyclicOrder(warm.map((n) => n.month));
  const comfortDh = warm.reduce((s, n) => s + Math.max(0, n.low - maxNightC) * Math.max(1, n.hoursObserved), 0);
  return {
    rule: "warm-nights",
    level: !isSeason ? "good" : typical >= maxNightC + 2 ? "poor" : "care",
    months: monthKeys(months),
    miss: { damage: 0, comfort: round1(comfortDh) },
    facts: [{ kind: "warm-nights", maxNightC, nights: warm.length, months, typicalLowC: round1(typical), season: isSeason }],
  };
};

/** Days against the comfortable day and the heat damage line, as for nights. */
export const hotDays: FitRule = (profile, season, t) => {
  const days = season.days.filter((d) => d.high !== null);
  if (days.length === 0) return unknown("hot-days");
  const { comfortDayC: comfort, damageDayC: damage } = linesOf(profile);
  const costsSpikes = profile.flowering.coolPeriod?.maxDayC !== undefined;
  const highest = Math.max(...days.map((d) => d.high!));
  const hot = days.filter((d) => d.high! > comfort + t.sensorMarginC);
  // Hourly means never exceed the day's high, so only days whose high passed the line are read hour by hour.
  const damaged = days.filter((d) => d.high! > damage && (d.temps?.length ? hoursOver(d.temps, damage) > 0 : true));
  const episodes = (list: typeof days, line: number): Episode[] =>
    [...list]
      .sort((a, b) => b.high! - a.high! || a.dayNumber - b.dayNumber)
      .slice(0, 3)
      .map((d) => ({ date: d.key, valueC: round1(d.high!), hours: Math.max(1, hoursOver(d.temps, line)) }));
  let comfortDh = 0, damageDh = 0;
  for (const d of hot) comfortDh += degreeHoursOver(d.temps, comfort, d.high!);
  for (const d of damaged) damageDh += degreeHoursOver(d.temps, damage, d.high!);
  const miss = { damage: round1(damageDh), comfort: round1(comfortDh) };
  if (damaged.length > 0) {
    return {
      rule: "hot-days",
      level: "poor",
      months: monthKeys(damaged.map((d) => d.month)),
      miss,
      facts: [{ kind: "heat-damage", damageC: damage, days: damaged.length, worst: episodes(damaged, damage), degreeHours: round1(damageDh) }],
    };
  }
  if (hot.length === 0) return { rule: "hot-days", level: "good", miss, facts: [{ kind: "heat-ok", comfortC: comfort, highestC: round1(highest) }] };
  const isSeason = densestWindow(hot.map((d) => d.dayNumber), t.seasonWindowDays) >= t.seasonNights;
  if (!isSeason) {
    return {
      rule: "hot-days",
      level: "care",
      months: monthKeys(hot.map((d) => d.month)),
      miss,
      facts: [{ kind: "heat-snap", comfortC: comfort, damageC: damage, days: hot.length, worst: episodes(hot, comfort), degreeHours: round1(comfortDh), costsSpikes }],
    };
  }
  const typical = median(hot.map((d) => d.high!));
  const months = cyclicOrder(hot.map((d) => d.month));
  return {
    rule: "hot-days",
    level: typical > (comfort + damage) / 2 ? "poor" : "care",
    months: monthKeys(months),
    miss,
    facts: [{ kind: "heat-season", comfortC: comfort, damageC: damage, days: hot.length, months, typicalHighC: round1(typical), degreeHours: round1(comfortDh), costsSpikes }],
  };
};

/** Each month's daily humidity minimums, sorted, once per season. */
const humidityCache = new WeakMap<SeasonProfile, { byMonth: number[][]; lowest: number; count: number }>();
function dailyHumidity(season: SeasonProfile) {
  let h = humidityCache.get(season);
  if (!h) {
    const byMonth: number[][] = Array.from({ length: 13 }, () => []);
    let lowest = Infinity, count = 0;
    for (const d of season.days) {
      if (d.rhLow === undefined || d.rhLow === null) continue;
      byMonth[d.month].push(d.rhLow);
      lowest = Math.min(lowest, d.rhLow);
      count++;
    }
    for (const list of byMonth) list.sort((a, b) => a - b);
    humidityCache.set(season, (h = { byMonth, lowest, count }));
  }
  return h;
}

/**
 * Humidity by its dry part of the day: each day's lowest reading against the group's minimum. A
 * month where that happens on a quarter of its days or more asks for care; the monthly mean would
 * hide a heated room's 30 % afternoons behind its 70 % nights. Dry air is fixable (a tray, grouping,
 * a humidifier), so never worse than care. Damp air: the monthly mean over the group's maximum.
 */
export const humidityBand: FitRule = (profile, season, t) => {
  const { byMonth, lowest: lowestDaily, count } = dailyHumidity(season);
  const months = season.year.filter((m) => m.humidity.mean !== null);
  if (months.length === 0 && count === 0) return unknown("humidity");
  const facts: Fact[] = [];
  const dryMonths: number[] = [];
  const dryDayMins: number[] = [];
  let dryDays = 0, daysInDryMonths = 0;
  for (let m = 1; m <= 12; m++) {
    const mins = byMonth[m];
    if (mins.length === 0) continue;
    // Sorted ascending: the dry days are a prefix.
    let dry = 0;
    while (dry < mins.length && mins[dry] < profile.humidityMin) dry++;
    if (dry / mins.length >= t.dryDayShare) {
      dryMonths.push(m);
      dryDays += dry;
      daysInDryMonths += mins.length;
      for (let i = 0; i < dry; i++) dryDayMins.push(mins[i]);
    }
  }
  if (dryMonths.length > 0) {
    facts.push({
      kind: "humidity-dry",
      minPct: profile.humidityMin,
      dryDays,
      days: daysInDryMonths,
      months: cyclicOrder(dryMonths),
      typicalDailyMinPct: Math.round(median(dryDayMins)),
      lowestPct: Math.round(Math.min(...dryDayMins)),
    });
  }
  const damp = months.filter((m) => m.humidity.mean! > profile.humidityMax);
  if (damp.length > 0) {
    facts.push({ kind: "humidity-damp", maxPct: profile.humidityMax, months: cyclicOrder(damp.map((m) => m.month)), meanPct: Math.round(Math.max(...damp.map((m) => m.humidity.mean!))) });
  }
  if (facts.length === 0) {
    const lowest = count ? lowestDaily : Math.min(...months.map((m) => m.humidity.lowest ?? m.humidity.mean!));
    return { rule: "humidity", level: "good", facts: [{ kind: "humidity-ok", minPct: profile.humidityMin, maxPct: profile.humidityMax, lowestDailyMinPct: Math.round(lowest) }] };
  }
  return { rule: "humidity", level: "care", months: monthKeys([...dryMonths, ...damp.map((m) => m.month)]), facts };
};

/**
 * Daily light integral month by month against the group's band: too dim and too bright. The yearly
 * mean would hide 19 mol in June and 3 in December. Low-light groups far over their maximum in
 * several months scorch (poor); the rest asks for care (a grow light, a sheer curtain). Light that
 * isn't measured is `unknown`, never fine.
 */
export const lightBand: FitRule = (profile, season, t) => {
  const measured = season.year.filter((m) => m.light.meanDli !== null && m.light.daysWithLight > 0);
  if (measured.length === 0) return { rule: "light", level: "unknown", noData: true, facts: [] };
  const months = measured.map((m) => ({ month: m.month, dli: round1(m.light.meanDli!) }));
  // A lux chip that clips in direct sun reads low: a clipped month isn't called dim on its word.
  const clipped = measured.filter((m) => (m.light as { luxClipped?: number | boolean }).luxClipped).map((m) => m.month);
  const dim = months.filter((m) => m.dli < profile.dliMin * (1 - t.lightEdgeShare) && !clipped.includes(m.month)).map((m) => m.month);
  const bright = months.filter((m) => m.dli > profile.dliMax * (1 + t.lightEdgeShare)).map((m) => m.month);
  const scorch = months.filter((m) => m.dli > profile.dliMax * t.lightFarFactor).map((m) => m.month);
  // Winter is dim at any window at high latitudes; what rules a group out is a growing season far
  // too dim: most of April–September (October–March in the south) under dliMin ÷ lightFarFactor.
  const growing = hemisphereMonths([4, 5, 6, 7, 8, 9], season);
  const farDim = months.filter((m) => growing.includes(m.month) && !clipped.includes(m.month) && m.dli < profile.dliMin / t.lightFarFactor).map((m) => m.month);
  const unmeasured = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].filter((m) => !measured.some((x) => x.month === m));
  const facts: Fact[] = [{ kind: "light-months", minDli: profile.dliMin, maxDli: profile.dliMax, months, dim, bright, scorch, unmeasured }];
  if (clipped.length) facts.push({ kind: "light-clipped", months: clipped });
  const level: RuleLevel =
    (profile.light === "low" && scorch.length >= t.scorchPoorMonths) || farDim.length >= 4
      ? "poor"
      : dim.length || bright.length
        ? "care"
        : unmeasured.length
          ? "unknown"
          : "good";
  return { rule: "light", level, months: monthKeys([...dim, ...bright]), facts };
};

/**
 * The best stretch of `weeks` weeks (within the cue months, when the group has them) in which
 * enough days meet the cool-period condition. Returns the count of qualifying days and their months.
 */
function bestCoolSpell(
  season: SeasonProfile,
  cond: (d: { low: number; high: number }) => boolean,
  inSeason: (month: number) => boolean,
  weeks: number,
): { best: number; months: number[] } {
  const days = season.days.filter((d) => d.low !== null && d.high !== null);
  if (days.length === 0) return { best: 0, months: [] };
  const first = days[0].dayNumber;
  const flags = new Uint8Array(days.at(-1)!.dayNumber - first + 1);
  const monthAt = new Uint8Array(flags.length);
  for (const d of days) {
    monthAt[d.dayNumber - first] = d.month;
    if (inSeason(d.month) && cond({ low: d.low!, high: d.high! })) flags[d.dayNumber - first] = 1;
  }
  const width = Math.min(weeks * 7, flags.length);
  let count = 0, best = 0, bestEnd = width - 1;
  for (let i = 0; i < flags.length; i++) {
    count += flags[i] - (i >= width ? flags[i - width] : 0);
    if (i >= width - 1 && count > best) {
      best = count;
      bestEnd = i;
    }
  }
  const months = new Set<number>();
  for (let i = Math.max(0, bestEnd - width + 1); i <= bestEnd; i++) if (flags[i]) months.add(monthAt[i]);
  return { best, months: cyclicOrder([...months]) };
}

const swingCache = new WeakMap<SeasonProfile, Map<number, { month: number; difC: number }[]>>();
/** Each month's typical (median) day–night difference, the day's high minus its low, once per season. */
function monthlySwings(season: SeasonProfile, minDays: number) {
  let byMin = swingCache.get(season);
  if (!byMin) swingCache.set(season, (byMin = new Map()));
  let out = byMin.get(minDays);
  if (!out) {
    const swings: number[][] = Array.from({ length: 13 }, () => []);
    for (const d of season.days) if (d.low !== null && d.high !== null) swings[d.month].push(d.high - d.low);
    out = [];
    for (let m = 1; m <= 12; m++) if (swings[m].length >= minDays) out.push({ month: m, difC: round1(median(swings[m])) });
    byMin.set(minDays, out);
  }
  return out;
}

/**
 * The flowering cue in its season (cool nights or cool days for some weeks, in the months the cue
 * counts) and the day–night difference as the day's high minus its low, month by month. Missing
 * them costs flowers, not the plant: care at worst.
 */
export const floweringNeeds: FitRule = (profile, season, t) => {
  const days = season.days.filter((d) => d.low !== null && d.high !== null);
  const cool = profile.flowering.coolPeriod;
  const need = profile.flowering.difC;
  if (!cool && need === undefined) return { rule: "flowering", level: "good", facts: [{ kind: "cue-none" }] };
  if (days.length === 0) return unknown("flowering");
  const facts: Fact[] = [];
  const levels: RuleLevel[] = [];
  const months: number[] = [];
  if (cool) {
    const cond = (d: { low: number; high: number }) => (cool.maxNightC === undefined || d.low <= cool.maxNightC) && (cool.maxDayC === undefined || d.high <= cool.maxDayC);
    const cueMonths = cool.cueMonths ? hemisphereMonths(cool.cueMonths, season) : null;
    const inSeason = (m: number) => !cueMonths || cueMonths.includes(m);
    const needDays = Math.ceil(cool.weeks * 7 * t.coolSpellShare);
    const hit = bestCoolSpell(season, cond, inSeason, cool.weeks);
    const dryRest = cool.dryRest ?? false;
    if (hit.best >= needDays) {
      facts.push({ kind: "cue-met", maxNightC: cool.maxNightC, maxDayC: cool.maxDayC, weeks: cool.weeks, months: hit.months, days: hit.best, dryRest });
      levels.push("good");
      months.push(...hit.months);
    } else {
      // Where the cool spell comes out of season, the months it does come (half their days or more).
      const anyTime = cueMonths ? bestCoolSpell(season, cond, () => true, cool.weeks) : { best: 0, months: [] };
      const coolMonths: number[] = [];
      if (anyTime.best >= needDays) {
        for (let m = 1; m <= 12; m++) {
          const inMonth = days.filter((d) => d.month === m);
          if (inMonth.length && inMonth.filter((d) => cond({ low: d.low!, high: d.high! })).length * 2 >= inMonth.length) coolMonths.push(m);
        }
      }
      facts.push({
        kind: "cue-missed",
        maxNightC: cool.maxNightC,
        maxDayC: cool.maxDayC,
        weeks: cool.weeks,
        bestDays: hit.best,
        cueMonths: cueMonths ? cyclicOrder(cueMonths) : [],
        outOfSeason: cyclicOrder(coolMonths),
        dryRest,
      });
      levels.push("care");
    }
  }
  if (need !== undefined) {
    const byMonth = monthlySwings(season, t.difMinDays);
    const meeting = byMonth.filter((x) => x.difC >= need - t.sensorMarginC);
    if (byMonth.length === 0) levels.push("unknown");
    else if (meeting.length > 0) {
      facts.push({ kind: "dif-met", needC: need, months: meeting });
      levels.push("good");
      months.push(...meeting.map((x) => x.month));
    } else {
      const best = byMonth.reduce((a, b) => (b.difC > a.difC ? b : a));
      facts.push({ kind: "dif-missed", needC: need, bestC: best.difC, bestMonth: best.month });
      levels.push("care");
    }
  }
  return { rule: "flowering", level: worstLevel(levels), facts, ...(months.length ? { months: monthKeys(months) } : {}) };
};

/**
 * Time the air spent within CONDENSATION_MARGIN_C of its dew point (the season profile counts it as
 * time under the margin). A 2 K margin is about 88 % RH, so for a group whose own range reaches that
 * (Masdevallia, Nepenthes) damp air is expected and the advice is air movement, not a warning.
 */
export const condensation: FitRule = (profile, season, t) => {
  const months = season.year.filter((m) => m.coverage.hoursObserved > 0);
  if (months.length === 0) return unknown("condensation");
  const total = round1(months.reduce((n, m) => n + m.condensationHours, 0));
  const share = (m: MonthOfYearProfile) => m.condensationHours / m.coverage.hoursObserved;
  const wet = months.filter((m) => share(m) >= t.condensationCareShare);
  if (wet.length === 0) return { rule: "condensation", level: "good", facts: [{ kind: "condensation-ok", hours: total, marginC: CONDENSATION_MARGIN_C }] };
  const worst = wet.reduce((a, b) => (share(b) > share(a) ? b : a));
  const expected = profile.humidityMax >= 88;
  return {
    rule: "condensation",
    level: expected ? "good" : "care",
    months: monthKeys(wet.map((m) => m.month)),
    facts: [
      {
        kind: "condensation-wet",
        hours: total,
        marginC: CONDENSATION_MARGIN_C,
        months: cyclicOrder(wet.map((m) => m.month)),
        worstMonth: worst.month,
        worstShare: Math.round(share(worst) * 100) / 100,
        expected,
      },
    ],
  };
};

export const FIT_RULES: FitRule[] = [coldNights, warmNights, hotDays, humidityBand, lightBand, floweringNeeds, condensation];

/**
 * What each rule reads of a plant profile. Plants alike in these get the same result in the same
 * season, so a fit table judges each distinct case once. A rule added without an entry is never shared.
 */
const RULE_INPUTS = new Map<FitRule, (p: PlantProfile) => string>([
  [coldNights, (p) => `${p.minNightC}|${linesOf(p).damageNightC}`],
  [warmNights, (p) => `${p.maxNightC}`],
  [hotDays, (p) => `${p.maxDayC}|${linesOf(p).damageDayC}|${p.flowering.coolPeriod?.maxDayC !== undefined}`],
  [humidityBand, (p) => `${p.humidityMin}|${p.humidityMax}`],
  [lightBand, (p) => `${p.dliMin}|${p.dliMax}|${p.light}`],
  [floweringNeeds, (p) => JSON.stringify(p.flowering)],
  [condensation, (p) => `${p.humidityMax >= 88}`],
]);

const judged = new WeakMap<SeasonProfile, WeakMap<FitThresholds, Map<string, RuleResult>>>();

/** Every rule's result for a plant in a season, in FIT_RULES order. Results are shared: don't mutate them. */
export function judgeAll(profile: PlantProfile, season: SeasonProfile, t: FitThresholds): RuleResult[] {
  let byThresholds = judged.get(season);
  if (!byThresholds) judged.set(season, (byThresholds = new WeakMap()));
  let known = byThresholds.get(t);
  if (!known) byThresholds.set(t, (known = new Map()));
  return FIT_RULES.map((rule, i) => {
    const inputs = RULE_INPUTS.get(rule);
    if (!inputs) return rule(profile, season, t);
    const key = `${i}|${inputs(profile)}`;
    let result = known.get(key);
    if (!result) known.set(key, (result = rule(profile, season, t)));
    return result;
  });
}
