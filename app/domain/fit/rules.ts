import { mean } from "simple-statistics";
import type { PlantProfile } from "~/domain/plants/library";
import { CONDENSATION_MARGIN_C, MONTH_NAMES } from "~/domain/season/profile";
import type { MonthOfYearProfile, SeasonProfile } from "~/domain/season/types";

export type RuleLevel = "ok" | "care" | "poor";

export type RuleResult = {
  rule: string;
  level: RuleLevel;
  message: string;
  /** Months of the year concerned, as month-of-year keys "01"–"12" (the year strip's columns). */
  months?: string[];
  /** Set when the rule had nothing to judge (no sensor for it, or no readings yet). */
  noData?: boolean;
  /** How far the worst night or day went past the group's limit, °C (cold nights, hot days). */
  shortfallC?: number;
};

/** Where each rule turns from ok to care to poor. Our own choices unless noted; kept as data so a page can show them. */
export type FitThresholds = {
  /** Poor when the lowest night is more than this far under the group's safe night… */
  nightPoorMarginC: number;
  /** …or when more than this many nights fall more than nightCountMarginC under it. */
  nightPoorCount: number;
  /**
   * Nights within this of the safe night count for care but not towards poor: a cheap sensor reads
   * to about ±0.5 °C (DHT22 and SHT3x data sheets), and the safe night is a comfortable minimum,
   * not a damage line — a heated room's 15.6 °C nights don't rule out a 16 °C group.
   */
  nightCountMarginC: number;
  /** Poor when the highest day is more than this far over the comfortable day… */
  dayPoorMarginC: number;
  /** …or when more than this many days go over it. */
  dayPoorCount: number;
  /** Mean DLI under dliMin × this is poor (under dliMin alone is care). */
  lightLowPoorFactor: number;
  /** Mean DLI over dliMax × this is poor (over dliMax alone is care). */
  lightHighPoorFactor: number;
  /** A month whose share of hours near the dew point reaches this asks for care. */
  condensationCareShare: number;
  /** A cool spell counts when this share of the days in the window qualify. */
  coolSpellShare: number;
  /** A month's mean day–night difference counts with at least this many days behind it. */
  difMinDays: number;
};

export const DEFAULT_FIT_THRESHOLDS: FitThresholds = {
  nightPoorMarginC: 2,
  nightPoorCount: 10,
  nightCountMarginC: 0.5,
  dayPoorMarginC: 4,
  dayPoorCount: 20,
  lightLowPoorFactor: 0.5,
  lightHighPoorFactor: 1.5,
  condensationCareShare: 0.1,
  coolSpellShare: 0.8,
  difMinDays: 10,
};

export type FitRule = (profile: PlantProfile, season: SeasonProfile, thresholds: FitThresholds) => RuleResult;

const LEVEL_RANK: Record<RuleLevel, number> = { ok: 0, care: 1, poor: 2 };
export const worstLevel = (levels: RuleLevel[]): RuleLevel =>
  levels.reduce<RuleLevel>((w, l) => (LEVEL_RANK[l] > LEVEL_RANK[w] ? l : w), "ok");

/** 7.2 → "7.2", 13.0 → "13", −0.04 → "0". */
export function formatNumber(x: number): string {
  const r = Math.round(x * 10) / 10;
  return (Object.is(r, -0) ? 0 : r).toFixed(1).replace(/\.0$/, "");
}
const c = (x: number) => `${formatNumber(x)} °C`;
const counts = new Intl.NumberFormat("en-GB");
const plural = (n: number, one: string, many = `${one}s`) => `${counts.format(n)} ${n === 1 ? one : many}`;

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

/** Contiguous runs of months in reading order: [11, 12, 1, 3] → [[11, 12, 1], [3]]. */
function monthRuns(months: number[]): number[][] {
  const runs: number[][] = [];
  for (const m of cyclicOrder(months)) {
    const last = runs.at(-1);
    if (last && m === (last.at(-1)! % 12) + 1) last.push(m);
    else runs.push([m]);
  }
  return runs;
}

const joinAnd = (parts: string[]) => (parts.length <= 1 ? parts.join("") : `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}`);

/**
 * "in July", "in July and August", "between November and February",
 * "in January, March and June", "in January–June and September".
 */
export function describeMonths(months: number[]): string {
  const runs = monthRuns(months);
  const name = (m: number) => MONTH_NAMES[m - 1];
  if (runs.length === 0) return "";
  if (runs.length === 1 && runs[0].length >= 3) return `between ${name(runs[0][0])} and ${name(runs[0].at(-1)!)}`;
  const parts = runs.flatMap((r) => (r.length >= 3 ? [`${name(r[0])}–${name(r.at(-1)!)}`] : r.map(name)));
  return `in ${joinAnd(parts)}`;
}

const monthKeys = (months: number[]) => cyclicOrder(months).map(monthKeyOf);

/** Months 1–12 whose bit is set in a 13-bit mask (bit m for month m). */
function maskMonths(mask: number): number[] {
  const out: number[] = [];
  for (let m = 1; m <= 12; m++) if (mask & (1 << m)) out.push(m);
  return out;
}

// A fit table asks the same season about its measured days once per plant and rule (50 spots × 40
// plants is 2,000 asks), so each season's days are laid out once as typed columns and the rules
// count over them without building arrays of days.
type Measured = {
  n: number;
  lows: Float64Array;
  highs: Float64Array;
  months: Uint8Array;
  dayNumbers: Int32Array;
  lowest: number;
  highest: number;
};
const measuredCache = new WeakMap<SeasonProfile, Measured>();
function measuredDays(season: SeasonProfile): Measured {
  let m = measuredCache.get(season);
  if (!m) {
    const days = season.days.filter((d) => d.low !== null && d.high !== null);
    const n = days.length;
    m = { n, lows: new Float64Array(n), highs: new Float64Array(n), months: new Uint8Array(n), dayNumbers: new Int32Array(n), lowest: Infinity, highest: -Infinity };
    for (let i = 0; i < n; i++) {
      const d = days[i];
      m.lows[i] = d.low!;
      m.highs[i] = d.high!;
      m.months[i] = d.month;
      m.dayNumbers[i] = d.dayNumber;
      if (d.low! < m.lowest) m.lowest = d.low!;
      if (d.high! > m.highest) m.highest = d.high!;
    }
    measuredCache.set(season, m);
  }
  return m;
}

const noReadings = (rule: string, what: string): RuleResult => ({
  rule,
  level: "ok",
  noData: true,
  message: `No ${what} readings yet, so this isn't judged.`,
});

/** Nights against the group's lowest safe night: the rule that decides most fits. */
export const coldNights: FitRule = (profile, season, t) => {
  const days = measuredDays(season);
  if (days.n === 0) return noReadings("cold-nights", "temperature");
  const lowest = days.lowest;
  const clearlyUnder = profile.minNightC - t.nightCountMarginC;
  let cold = 0, clearlyCold = 0, mask = 0;
  // Counted by night (evening to morning, see NIGHT_START_HOUR), so one cold night is one night.
  for (const night of season.nights) {
    if (night.low < profile.minNightC) {
      cold++;
      mask |= 1 << night.month;
      if (night.low < clearlyUnder) clearlyCold++;
    }
  }
  const wants = `this group wants ${c(profile.minNightC)} or more`;
  if (cold === 0) {
    return { rule: "cold-nights", level: "ok", message: `Nights stayed at ${c(profile.minNightC)} or above (lowest ${c(lowest)}); ${wants}.` };
  }
  const months = cyclicOrder(maskMonths(mask));
  const poor = profile.minNightC - lowest > t.nightPoorMarginC || clearlyCold > t.nightPoorCount;
  const when = `${plural(cold, "night")} ${describeMonths(months)} (lowest ${c(lowest)})`;
  return {
    rule: "cold-nights",
    level: poor ? "poor" : "care",
    shortfallC: profile.minNightC - lowest,
    months: monthKeys(months),
    message: poor
      ? `Nights fell below ${c(profile.minNightC)} on ${when}; ${wants}. Cold tolerance: ${profile.coldTolerance}.`
      : cold > t.nightPoorCount
        ? `Nights ran a touch under ${c(profile.minNightC)} on ${when}, never more than ${c(t.nightCountMarginC)} under — about what a cheap sensor can tell apart; ${wants}. Fine for most plants of the group; watch the tender ones.`
        : `Nights dipped just under ${c(profile.minNightC)} on ${when}; ${wants}. Moving it back from the glass or bringing it in on the coldest nights may be enough.`,
  };
};

/** Days against the group's highest comfortable day. */
export const hotDays: FitRule = (profile, season, t) => {
  const days = measuredDays(season);
  if (days.n === 0) return noReadings("hot-days", "temperature");
  const highest = days.highest;
  let hot = 0, mask = 0;
  for (let i = 0; i < days.n; i++) {
    if (days.highs[i] > profile.maxDayC) {
      hot++;
      mask |= 1 << days.months[i];
    }
  }
  if (hot === 0) {
    return { rule: "hot-days", level: "ok", message: `Days stayed at ${c(profile.maxDayC)} or below (highest ${c(highest)}).` };
  }
  const months = cyclicOrder(maskMonths(mask));
  const poor = highest - profile.maxDayC > t.dayPoorMarginC || hot > t.dayPoorCount;
  // Groups cued to flower by cool days (Phalaenopsis) lose flowers to heat before they lose health.
  const flowerCost = profile.flowering.coolPeriod?.maxDayC !== undefined ? ` — ${shortName(profile)} may not spike` : "";
  return {
    rule: "hot-days",
    level: poor ? "poor" : "care",
    shortfallC: highest - profile.maxDayC,
    months: monthKeys(months),
    message:
      `Days went above ${c(profile.maxDayC)} on ${plural(hot, "day")} ${describeMonths(months)} (highest ${c(highest)})${flowerCost}; ` +
      `this group is comfortable up to ${c(profile.maxDayC)}.` +
      (poor ? "" : " Shade at midday and moving air help."),
  };
};

const withHumidity = (season: SeasonProfile) => season.year.filter((m) => m.humidity.mean !== null);
const pct = (x: number) => `${Math.round(x)} %`;
const range = (lo: number, hi: number) => (Math.round(lo) === Math.round(hi) ? pct(lo) : `${Math.round(lo)}–${pct(hi)}`);

/** Monthly mean humidity against the group's band. Dry air is fixable, so never worse than care. */
export const humidityBand: FitRule = (profile, season) => {
  const months = withHumidity(season);
  if (months.length === 0) return noReadings("humidity", "humidity");
  const band = `${profile.humidityMin}–${profile.humidityMax} %`;
  const dry = months.filter((m) => m.humidity.mean! < profile.humidityMin);
  const damp = months.filter((m) => m.humidity.mean! > profile.humidityMax);
  const means = months.map((m) => m.humidity.mean!);
  if (dry.length === 0 && damp.length === 0) {
    return {
      rule: "humidity",
      level: "ok",
      message: `Humidity averaged ${range(Math.min(...means), Math.max(...means))} month by month, inside this group's ${band}.`,
    };
  }
  const parts: string[] = [];
  if (dry.length > 0) {
    const driest = Math.min(...dry.map((m) => m.humidity.mean!));
    parts.push(
      `The air averaged as low as ${pct(driest)} ${describeMonths(dry.map((m) => m.month))}; this group wants ${band}. ` +
        "A tray of wet gravel under the pot, grouping plants together or a room humidifier raises it.",
    );
  }
  if (damp.length > 0) {
    const dampest = Math.max(...damp.map((m) => m.humidity.mean!));
    parts.push(
      `The air averaged up to ${pct(dampest)} ${describeMonths(damp.map((m) => m.month))}, above this group's ${band}; ` +
        "give it more air movement so leaves dry between waterings.",
    );
  }
  return { rule: "humidity", level: "care", months: monthKeys([...dry, ...damp].map((m) => m.month)), message: parts.join(" ") };
};

const DLI_UNIT = "mol m⁻² d⁻¹";

/** Daily light integral against the group's band, where the spot has a light sensor. */
export const lightBand: FitRule = (profile, season, t) => {
  const months = season.year.filter((m) => m.light.meanDli !== null);
  if (months.length === 0) {
    return {
      rule: "light",
      level: "ok",
      noData: true,
      message: "No light sensor in this spot, so light isn't judged here; an estimate from the window facing is outside this rule.",
    };
  }
  const avg = mean(months.map((m) => m.light.meanDli!));
  const band = `${formatNumber(profile.dliMin)}–${formatNumber(profile.dliMax)} ${DLI_UNIT}`;
  const dim = months.filter((m) => m.light.meanDli! < profile.dliMin);
  const bright = months.filter((m) => m.light.meanDli! > profile.dliMax);
  const level: RuleLevel =
    avg < profile.dliMin * t.lightLowPoorFactor || avg > profile.dliMax * t.lightHighPoorFactor
      ? "poor"
      : avg < profile.dliMin || avg > profile.dliMax
        ? "care"
        : "ok";
  const basis = `over ${plural(months.length, "month")} with light readings`;
  const notes: string[] = [];
  if (dim.length > 0) notes.push(`Too dim ${describeMonths(dim.map((m) => m.month))}.`);
  if (bright.length > 0) notes.push(`Too bright ${describeMonths(bright.map((m) => m.month))}.`);
  const advice =
    level === "ok" ? "" : avg < profile.dliMin ? " A brighter window or a grow light would be needed." : " It needs shade from direct sun here.";
  return {
    rule: "light",
    level,
    months: monthKeys([...dim, ...bright].map((m) => m.month)),
    message: `Daily light averaged ${formatNumber(avg)} ${DLI_UNIT} ${basis}; this group wants ${band}.${notes.length ? " " + notes.join(" ") : ""}${advice}`,
  };
};

type Part = { level: RuleLevel; message: string; months: number[]; noData?: boolean };

/**
 * The most days meeting the cool-period condition in any run of `window` consecutive calendar days
 * (days without readings count as not meeting it), and the months of those days. The first such
 * window wins a tie.
 */
function bestCoolSpell(days: Measured, maxNightC: number, maxDayC: number | undefined, window: number): { best: number; bestMonths: number[] } {
  const first = days.dayNumbers[0];
  const flags = new Uint8Array(days.dayNumbers[days.n - 1] - first + 1);
  for (let i = 0; i < days.n; i++) {
    if (days.lows[i] <= maxNightC && (maxDayC === undefined || days.highs[i] <= maxDayC)) flags[days.dayNumbers[i] - first] = 1;
  }
  const width = Math.min(window, flags.length);
  let count = 0, best = 0, bestEnd = width - 1;
  for (let i = 0; i < flags.length; i++) {
    count += flags[i] - (i >= width ? flags[i - width] : 0);
    if (i >= width - 1 && count > best) {
      best = count;
      bestEnd = i;
    }
  }
  let mask = 0;
  for (let i = 0; i < days.n; i++) {
    const at = days.dayNumbers[i] - first;
    if (flags[at] && at > bestEnd - width && at <= bestEnd) mask |= 1 << days.months[i];
  }
  return { best, bestMonths: maskMonths(mask) };
}

/** Best stretch of `weeks` weeks in which enough days meet the cool-period condition. */
function coolSpell(profile: PlantProfile, season: SeasonProfile, t: FitThresholds): Part {
  const cp = profile.flowering.coolPeriod!;
  const name = shortName(profile);
  const days = measuredDays(season);
  const condition =
    cp.maxDayC === undefined
      ? `nights at or below ${c(cp.maxNightC)}`
      : `days at or below ${c(cp.maxDayC)} with nights at or below ${c(cp.maxNightC)}`;
  if (days.n === 0) return { level: "ok", noData: true, months: [], message: `No readings yet to tell whether it gets ${condition}.` };
  const window = cp.weeks * 7;
  const { best, bestMonths } = bestCoolSpell(days, cp.maxNightC, cp.maxDayC, window);
  const needed = Math.ceil(window * t.coolSpellShare);
  const during = cp.months ? ` (${cp.months})` : "";
  if (best >= needed) {
    return {
      level: "ok",
      months: cyclicOrder(bestMonths),
      message: `It gets its cool spell: ${condition} on ${best} of ${window} days ${describeMonths(bestMonths)}, enough for ${name} to flower.`,
    };
  }
  if (best === 0) {
    return {
      level: "care",
      months: [],
      message: `It never had ${condition}; ${name} needs about ${plural(cp.weeks, "week")} of them${during} to flower — it may grow here but not flower.`,
    };
  }
  return {
    level: "care",
    months: cyclicOrder(bestMonths),
    message: `At best ${best} of any ${window} days had ${condition}; ${name} needs about ${plural(cp.weeks, "week")} of them${during} to flower — it may grow here but not flower.`,
  };
}

function difNeed(profile: PlantProfile, season: SeasonProfile, t: FitThresholds): Part {
  const need = profile.flowering.difC!;
  const name = shortName(profile);
  const months = season.year.filter(
    (m): m is MonthOfYearProfile & { temperature: { meanDayNightDifference: number } } =>
      m.temperature.meanDayNightDifference !== null && m.temperature.daysWithDayAndNight >= t.difMinDays,
  );
  if (months.length === 0) {
    return { level: "ok", noData: true, months: [], message: "Not enough days yet to judge the drop from day to night." };
  }
  const meeting = months.filter((m) => m.temperature.meanDayNightDifference >= need);
  const best = Math.max(...months.map((m) => m.temperature.meanDayNightDifference));
  if (meeting.length > 0) {
    return {
      level: "ok",
      months: meeting.map((m) => m.month),
      message: `Days ran up to ${c(best)} warmer than nights, meeting the ${c(need)} ${name} flowers best with ${describeMonths(meeting.map((m) => m.month))}.`,
    };
  }
  return {
    level: "care",
    months: [],
    message: `Days ran at most ${c(best)} warmer than nights in any month; ${name} flowers best with about ${c(need)} — it may grow but flower poorly.`,
  };
}

/** The day–night difference or cool period the group needs to flower. Missing it costs flowers, not the plant: care at worst. */
export const floweringNeeds: FitRule = (profile, season, t) => {
  const parts: Part[] = [];
  if (profile.flowering.coolPeriod) parts.push(coolSpell(profile, season, t));
  if (profile.flowering.difC !== undefined) parts.push(difNeed(profile, season, t));
  if (parts.length === 0) {
    return { rule: "flowering", level: "ok", message: `No temperature cue needed to flower. ${profile.flowering.note}` };
  }
  const months = [...new Set(parts.flatMap((p) => p.months))];
  return {
    rule: "flowering",
    level: worstLevel(parts.map((p) => p.level)),
    message: parts.map((p) => p.message).join(" "),
    ...(months.length ? { months: monthKeys(months) } : {}),
    ...(parts.every((p) => p.noData) ? { noData: true } : {}),
  };
};

/** Hours within 2 °C of the dew point: wet glass and leaves, a fungal and rot risk. */
export const condensation: FitRule = (_profile, season, t) => {
  const months = season.year.filter((m) => m.coverage.hoursObserved > 0);
  if (months.length === 0) return noReadings("condensation", "temperature and humidity");
  const total = months.reduce((n, m) => n + m.condensationHours, 0);
  const share = (m: MonthOfYearProfile) => m.condensationHours / m.coverage.hoursObserved;
  const wet = months.filter((m) => share(m) >= t.condensationCareShare);
  const margin = c(CONDENSATION_MARGIN_C);
  if (wet.length === 0) {
    return {
      rule: "condensation",
      level: "ok",
      message: `The air came within ${margin} of the dew point for ${plural(total, "hour")} in all — little risk of wet leaves.`,
    };
  }
  const worst = wet.reduce((a, b) => (share(b) > share(a) ? b : a));
  return {
    rule: "condensation",
    level: "care",
    months: monthKeys(wet.map((m) => m.month)),
    message:
      `The air sat within ${margin} of the dew point for ${plural(total, "hour")}, most ${describeMonths(wet.map((m) => m.month))} ` +
      `(${Math.round(share(worst) * 100)} % of the hours in ${worst.name}): glass and leaves stay wet, which invites rot and fungal spots. ` +
      "More air movement and watering early in the day help.",
  };
};

export const FIT_RULES: FitRule[] = [coldNights, hotDays, humidityBand, lightBand, floweringNeeds, condensation];

/**
 * What each rule reads of a plant profile. Plants alike in these get the same result in the same
 * season, so a fit table (many spots × a library whose groups share their limits, plus the site's
 * copies of them) judges each distinct case once. A rule added without an entry is never shared.
 */
const RULE_INPUTS = new Map<FitRule, (p: PlantProfile) => string>([
  [coldNights, (p) => `${p.minNightC}|${p.coldTolerance}`],
  [hotDays, (p) => `${p.maxDayC}|${p.flowering.coolPeriod?.maxDayC !== undefined}|${shortName(p)}`],
  [humidityBand, (p) => `${p.humidityMin}|${p.humidityMax}`],
  [lightBand, (p) => `${p.dliMin}|${p.dliMax}`],
  [floweringNeeds, (p) => `${JSON.stringify(p.flowering)}|${shortName(p)}`],
  [condensation, () => ""],
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
