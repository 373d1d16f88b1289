import { mean, quantileSorted } from "simple-statistics";
import * as SunCalc from "suncalc";
import {
  DAY_MS,
  dateOfDayNumber,
  dayKey,
  dayNumberOf,
  daysInMonth,
  monthKey,
  zoneClock,
  type LocalDate,
} from "~/domain/season/local-time";
import { luxPerPpfdFor } from "~/domain/climate/light";
import type { LightSource } from "~/domain/vocabulary";
import { resolveWall } from "~/lib/time";
import type {
  DaySummary,
  Hemisphere,
  HourlyRollup,
  LuxClipping,
  MonthOfYearProfile,
  MonthProfile,
  NightSummary,
  PeriodStats,
  SeasonName,
  SeasonPeriodProfile,
  SeasonProfile,
  Site,
} from "~/domain/season/types";

/** A local day counts as observed with this many hours of temperature (of 23–25). */
export const MIN_HOURS_FOR_DAY = 18;
/**
 * Coverage rule: a month (or all Januaries together, etc.) has enough data when at least this
 * many of its days are observed — two thirds of a month, so a week's gap can't hide a cold spell.
 * A season has enough when each of its three months has.
 */
export const MIN_DAYS_FOR_MONTH = 20;
/** A day's light integral is used only with this many hours of light samples. */
export const MIN_LIGHT_HOURS_FOR_DLI = 20;
/** Dew-point margin under which glass and leaves are taken to be wet (brief). */
export const CONDENSATION_MARGIN_C = 2;
/**
 * Lux per µmol m⁻² s⁻¹ for sunlight — Thimijan & Heins (1983), HortScience 18, 818–822. The
 * default; a spot lit by lamps uses its light source's factor (LIGHT_SOURCE_LUX_PER_PPFD).
 */
export const SUNLIGHT_LUX_PER_PPFD = 54;
/**
 * Clipping: a light sensor clips when at least CLIP_MIN_HOURS hours on CLIP_MIN_DAYS days have
 * their highest reading within CLIP_TOLERANCE of the profile's highest, and no fewer hours sit in
 * the 10 % just under it. Natural light has a thin, sloping top (a few hours come close to the
 * brightest, many more a little lower); a saturated chip piles its hours on one value. Lamps are
 * flat by nature, so spots lit by LED or fluorescent tubes alone are not checked. Our rule, not a
 * published one; the ceiling must be at least CLIP_MIN_LUX, well above any lamp-free room's light.
 */
export const CLIP_TOLERANCE = 0.002;
export const CLIP_MIN_HOURS = 5;
export const CLIP_MIN_DAYS = 2;
export const CLIP_MIN_LUX = 1_000;
export const DEFAULT_THRESHOLDS_C = [10];
/**
 * A night runs from 18:00 to 08:00 the next morning, local time, and belongs to the date it starts
 * on: one cold spell from 22:00 to 06:00 is one night, not two calendar days (common practice: the
 * grower's "night of the 5th" ends on the morning of the 6th).
 */
export const NIGHT_START_HOUR = 18;
export const NIGHT_END_HOUR = 8;

export const MONTH_NAMES = [
  "January", "February", "March", "April", "May", "June",
  "July", "August", "September", "October", "November", "December",
] as const;

/** `lightSource` picks the lux → PPFD factor of the DLI (default sunlight) and whether clipping is looked for. */
export type SeasonProfileOptions = { from: Date; to: Date; thresholds?: number[]; lightSource?: LightSource };

type DayAgg = {
  dayNumber: number;
  date: LocalDate;
  hours: number;
  tempMeans: number[];
  low: number;
  high: number;
  rhSum: number;
  rhN: number;
  rhLow: number;
  rhHigh: number;
  belowHours: number[];
  /** Nights counted with this day: the one starting on it, and an earlier one whose evening has no day of its own. */
  nights: Night[];
  condensationHours: number;
  daySum: number;
  dayN: number;
  nightSum: number;
  nightN: number;
  dliSum: number;
  lightHours: number;
  /** Each light hour's highest lux (its mean in rollups without a maximum). */
  luxTops: number[];
  sunUp: number; // ms; ±Infinity in polar day or night
  sunDown: number;
};

const HOUR_MS = 3_600_000;

type Night = { dayNumber: number; low: number; hours: number; morningDay: number; temps: number[] };

export function hemisphereOf(latitude: number): Hemisphere {
  return latitude < 0 ? "southern" : "northern";
}

const isValidDate = (d: Date | null | undefined): d is Date => d instanceof Date && !Number.isNaN(d.getTime());

const sunWindows = new Map<string, { sunUp: number; sunDown: number }>();
const SUN_CACHE_LIMIT = 100_000; // about 270 site-years; cleared rather than grown without bound

/** Sunrise and sunset of one local day (suncalc), remembered: they don't change between calls. */
function sunWindow(noonMs: number, dayNumber: number, site: Site): { sunUp: number; sunDown: number } {
  const key = `${site.latitude},${site.longitude},${site.timeZone},${dayNumber}`;
  const known = sunWindows.get(key);
  if (known) return known;
  const t = SunCalc.getTimes(new Date(noonMs), site.latitude, site.longitude);
  const rise = isValidDate(t.sunrise) ? t.sunrise.getTime() : null;
  const set = isValidDate(t.sunset) ? t.sunset.getTime() : null;
  const up = t.alwaysUp === true;
  const win = {
    sunUp: rise ?? (up ? -Infinity : Infinity),
    sunDown: set ?? (up || rise !== null ? Infinity : -Infinity),
  };
  if (sunWindows.size >= SUN_CACHE_LIMIT) sunWindows.clear();
  sunWindows.set(key, win);
  return win;
}

function newDay(dayNumber: number, thresholdCount: number, sun: { sunUp: number; sunDown: number }): DayAgg {
  return {
    dayNumber,
    date: dateOfDayNumber(dayNumber),
    hours: 0,
    tempMeans: [],
    low: Infinity,
    high: -Infinity,
    rhSum: 0,
    rhN: 0,
    rhLow: Infinity,
    rhHigh: -Infinity,
    belowHours: new Array<number>(thresholdCount).fill(0),
    nights: [],
    condensationHours: 0,
    daySum: 0,
    dayN: 0,
    nightSum: 0,
    nightN: 0,
    dliSum: 0,
    lightHours: 0,
    luxTops: [],
    ...sun,
  };
}

function addHour(day: DayAgg, r: HourlyRollup, ms: number, thresholds: number[], luxPerPpfd: number): void {
  if (r.tN > 0 && r.tSum !== null) {
    const m = r.tSum / r.tN;
    day.hours++;
    day.tempMeans.push(m);
    day.low = Math.min(day.low, r.tMin ?? m);
    day.high = Math.max(day.high, r.tMax ?? m);
    for (let i = 0; i < thresholds.length; i++) if (m < thresholds[i]) day.belowHours[i]++;
    // An hour belongs to the day when its midpoint is between sunrise and sunset.
    const mid = ms + HOUR_MS / 2;
    if (mid >= day.sunUp && mid < day.sunDown) {
      day.daySum += m;
      day.dayN++;
    } else {
      day.nightSum += m;
      day.nightN++;
    }
  }
  if (r.hN > 0 && r.hSum !== null) {
    const m = r.hSum / r.hN;
    day.rhSum += m;
    day.rhN++;
    day.rhLow = Math.min(day.rhLow, r.hMin ?? m);
    day.rhHigh = Math.max(day.rhHigh, r.hMax ?? m);
  }
  // The share of the hour's readings under the margin, as the time spent under it; rollups written
  // before that count was kept have only the hour's lowest margin, and count whole hours.
  if (r.dpN) day.condensationHours += (r.dpUnderN ?? 0) / r.dpN;
  else if (r.dpMarginMin !== null && r.dpMarginMin < CONDENSATION_MARGIN_C) day.condensationHours++;
  if (r.luxN > 0 && r.luxSum !== null) {
    // PPFD = lux / the light source's factor (54 for sunlight); one hour at that PPFD = PPFD × 3600
    // µmol m⁻², /1e6 → mol.
    const meanLux = r.luxSum / r.luxN;
    day.dliSum += ((meanLux / luxPerPpfd) * 3600) / 1e6;
    day.lightHours++;
    day.luxTops.push(r.luxMax ?? meanLux);
  }
}

const finiteOrNull = (v: number) => (Number.isFinite(v) ? v : null);
const meanOrNull = (xs: number[]) => (xs.length > 0 ? mean(xs) : null);

function dayNightDifference(d: DayAgg): number | null {
  return d.dayN > 0 && d.nightN > 0 ? d.daySum / d.dayN - d.nightSum / d.nightN : null;
}

function dayDli(d: DayAgg): number | null {
  return d.lightHours >= MIN_LIGHT_HOURS_FOR_DLI ? d.dliSum : null;
}

type Stats = Omit<PeriodStats, "coverage"> & { hoursObserved: number; daysObserved: number };

/** The sensor's ceiling and the lowest reading counted as at it, or null when the light does not clip. */
type Ceiling = { lux: number; edge: number };

/** Looks for a flat top in the hours' highest lux readings (see CLIP_TOLERANCE). */
function findLuxCeiling(days: DayAgg[]): Ceiling | null {
  let top = -Infinity;
  for (const d of days) for (const v of d.luxTops) if (v > top) top = v;
  if (!(top >= CLIP_MIN_LUX)) return null;
  const edge = top * (1 - CLIP_TOLERANCE);
  const shoulder = top * 0.9;
  let at = 0, daysAt = 0, near = 0;
  for (const d of days) {
    let here = 0;
    for (const v of d.luxTops) {
      if (v >= edge) here++;
      else if (v >= shoulder) near++;
    }
    at += here;
    if (here > 0) daysAt++;
  }
  return at >= CLIP_MIN_HOURS && daysAt >= CLIP_MIN_DAYS && at >= near ? { lux: top, edge } : null;
}

/** Hours and days of `days` at the ceiling. */
function clippingIn(days: DayAgg[], ceiling: Ceiling | null): LuxClipping | null {
  if (!ceiling) return null;
  let hours = 0, withHours = 0;
  for (const d of days) {
    let here = 0;
    for (const v of d.luxTops) if (v >= ceiling.edge) here++;
    hours += here;
    if (here > 0) withHours++;
  }
  return hours > 0 ? { ceilingLux: ceiling.lux, hours, days: withHours } : null;
}

/** Hourly means of the days, sorted; typed arrays sort numerically and fast. */
function sortedHourlyMeans(days: DayAgg[]): Float64Array {
  let n = 0;
  for (const d of days) n += d.tempMeans.length;
  const out = new Float64Array(n);
  let i = 0;
  for (const d of days) {
    out.set(d.tempMeans, i);
    i += d.tempMeans.length;
  }
  return out.sort();
}

/** One sorted array from several sorted ones (a season from its months), without sorting again. */
function mergeSorted(parts: Float64Array[]): Float64Array {
  if (parts.length === 1) return parts[0];
  let merged: Float64Array = new Float64Array(0);
  for (const part of parts) {
    const out = new Float64Array(merged.length + part.length);
    let i = 0, j = 0, k = 0;
    while (i < merged.length && j < part.length) out[k++] = merged[i] <= part[j] ? merged[i++] : part[j++];
    while (i < merged.length) out[k++] = merged[i++];
    while (j < part.length) out[k++] = part[j++];
    merged = out;
  }
  return merged;
}

/** `hourly`: the days' hourly mean temperatures, sorted (the caller may have them already). */
function aggregate(days: DayAgg[], thresholds: number[], ceiling: Ceiling | null, hourly: Float64Array = sortedHourlyMeans(days)): Stats {
  const complete = days.filter((d) => d.hours >= MIN_HOURS_FOR_DAY);
  const difs: number[] = [];
  const dlis: number[] = [];
  let lowest = Infinity, highest = -Infinity, rhLow = Infinity, rhHigh = -Infinity;
  let condensationHours = 0, rhSum = 0, rhN = 0, hoursObserved = 0;
  const below = thresholds.map((thresholdC) => ({ thresholdC, hours: 0, nights: 0 }));
  for (const d of days) {
    lowest = Math.min(lowest, d.low);
    highest = Math.max(highest, d.high);
    rhLow = Math.min(rhLow, d.rhLow);
    rhHigh = Math.max(rhHigh, d.rhHigh);
    rhSum += d.rhSum;
    rhN += d.rhN;
    condensationHours += d.condensationHours;
    for (const n of d.nights) for (let i = 0; i < below.length; i++) if (n.low < below[i].thresholdC) below[i].nights++;
    hoursObserved += d.hours;
    const dif = dayNightDifference(d);
    if (dif !== null) difs.push(dif);
    const dli = dayDli(d);
    if (dli !== null) dlis.push(dli);
    for (let i = 0; i < below.length; i++) {
      below[i].hours += d.belowHours[i];
    }
  }
  return {
    temperature: {
      lowest: finiteOrNull(lowest),
      highest: finiteOrNull(highest),
      // Percentiles of hourly mean temperature, so hour-weighted: a sample burst can't skew them.
      // simple-statistics quantileSorted interpolates linearly (Hyndman & Fan type 7).
      // (quantileSorted only indexes and reads length, which a Float64Array provides.)
      p05: hourly.length > 0 ? quantileSorted(hourly as unknown as number[], 0.05) : null,
      p95: hourly.length > 0 ? quantileSorted(hourly as unknown as number[], 0.95) : null,
      meanDailyLow: meanOrNull(complete.map((d) => d.low)),
      meanDailyHigh: meanOrNull(complete.map((d) => d.high)),
      meanDayNightDifference: meanOrNull(difs),
      daysWithDayAndNight: difs.length,
    },
    // Hour-weighted like the temperature percentiles: the mean of hourly means.
    humidity: { lowest: finiteOrNull(rhLow), highest: finiteOrNull(rhHigh), mean: rhN > 0 ? rhSum / rhN : null },
    below,
    condensationHours: Math.round(condensationHours * 10) / 10,
    light: { meanDli: meanOrNull(dlis), daysWithLight: dlis.length },
    luxClipped: clippingIn(days, ceiling),
    hoursObserved,
    daysObserved: complete.length,
  };
}

function withCoverage(s: Stats, daysInPeriod: number, daysInRange: number, enough: boolean): PeriodStats {
  const { hoursObserved, daysObserved, ...rest } = s;
  return { ...rest, coverage: { hoursObserved, daysObserved, daysInPeriod, daysInRange, enough } };
}

const SEASON_BY_START: Record<Hemisphere, Record<number, SeasonName>> = {
  northern: { 12: "winter", 3: "spring", 6: "summer", 9: "autumn" },
  southern: { 12: "summer", 3: "autumn", 6: "winter", 9: "spring" },
};

/** Meteorological seasons: Dec–Feb, Mar–May, Jun–Aug, Sep–Nov; names flip in the south. */
function seasonStart(year: number, month: number): { year: number; month: number } {
  if (month === 12) return { year, month: 12 };
  if (month <= 2) return { year: year - 1, month: 12 };
  return { year, month: month - (month % 3) };
}

function addMonths(year: number, month: number, n: number): { year: number; month: number } {
  const i = year * 12 + (month - 1) + n;
  return { year: Math.floor(i / 12), month: (i % 12) + 1 };
}

/**
 * Season profile of one spot over [from, to): per local calendar month, per season of the
 * site's hemisphere, per month of the year across years, and per local day.
 */
export function seasonProfile(rollups: HourlyRollup[], site: Site, opts: SeasonProfileOptions): SeasonProfile {
  const thresholds = [...new Set([...DEFAULT_THRESHOLDS_C, ...(opts.thresholds ?? [])])].sort((a, b) => a - b);
  const luxPerPpfd = luxPerPpfdFor(opts.lightSource);
  const hemisphere = hemisphereOf(site.latitude);
  const clock = zoneClock(site.timeZone);
  const fromMs = opts.from.getTime();
  const toMs = opts.to.getTime();

  const days = new Map<number, DayAgg>();
  const nights = new Map<number, Night>();
  for (const r of rollups) {
    const ms = r.hour.getTime();
    if (ms < fromMs || ms >= toMs) continue;
    const local = ms + clock.offsetAt(ms);
    const dayNumber = Math.floor(local / DAY_MS);
    let day = days.get(dayNumber);
    if (!day) {
      const localNoonMs = resolveWall(dayNumber * DAY_MS + 12 * HOUR_MS, site.timeZone).ms;
      day = newDay(dayNumber, thresholds.length, sunWindow(localNoonMs, dayNumber, site));
      days.set(dayNumber, day);
    }
    addHour(day, r, ms, thresholds, luxPerPpfd);
    const hourOfDay = Math.floor((local - dayNumber * DAY_MS) / HOUR_MS);
    if (r.tN > 0 && r.tSum !== null && (hourOfDay >= NIGHT_START_HOUR || hourOfDay < NIGHT_END_HOUR)) {
      const start = hourOfDay >= NIGHT_START_HOUR ? dayNumber : dayNumber - 1;
      const low = r.tMin ?? r.tSum / r.tN;
      const night = nights.get(start);
      if (night) {
        night.low = Math.min(night.low, low);
        night.hours++;
        night.temps.push(r.tSum / r.tN);
      } else nights.set(start, { dayNumber: start, low, hours: 1, morningDay: dayNumber, temps: [r.tSum / r.tN] });
    }
  }
  // A night is counted with the day it starts on; one whose evening has no readings (a file that
  // starts at midnight) with its morning's day, so it is neither lost nor counted twice.
  // A night that started before the requested range is left to the range before it.
  const firstLocalDay = clock.localDayNumber(fromMs);
  for (const n of nights.values()) {
    if (n.dayNumber < firstLocalDay) nights.delete(n.dayNumber);
    else (days.get(n.dayNumber) ?? days.get(n.morningDay))!.nights.push(n);
  }

  const orderedDays = [...days.values()].sort((a, b) => a.dayNumber - b.dayNumber);
  const lampsOnly = opts.lightSource === "led" || opts.lightSource === "fluorescent";
  const ceiling = lampsOnly ? null : findLuxCeiling(orderedDays);
  const daysByMonth = new Map<string, DayAgg[]>();
  for (const d of orderedDays) {
    const key = monthKey(d.date.year, d.date.month);
    const list = daysByMonth.get(key);
    if (list) list.push(d);
    else daysByMonth.set(key, [d]);
  }

  const months: MonthProfile[] = [];
  const monthDays = new Map<string, DayAgg[]>();
  // Each month's hourly means are sorted once; seasons and months of the year merge them, and a
  // month of the year seen in one calendar month only (the usual year) reuses that month's figures.
  const monthHourly = new Map<string, Float64Array>();
  const monthStats = new Map<string, Stats>();
  if (toMs > fromMs) {
    const firstDay = clock.localDayNumber(fromMs);
    const lastDay = clock.localDayNumber(toMs - 1);
    const first = dateOfDayNumber(firstDay);
    const last = dateOfDayNumber(lastDay);
    for (let ym = { year: first.year, month: first.month }; ym.year * 12 + ym.month <= last.year * 12 + last.month; ym = addMonths(ym.year, ym.month, 1)) {
      const key = monthKey(ym.year, ym.month);
      const dim = daysInMonth(ym.year, ym.month);
      const start = dayNumberOf(ym.year, ym.month, 1);
      const inRange = Math.min(start + dim - 1, lastDay) - Math.max(start, firstDay) + 1;
      const list = daysByMonth.get(key) ?? [];
      monthDays.set(key, list);
      const hourly = sortedHourlyMeans(list);
      monthHourly.set(key, hourly);
      const stats = aggregate(list, thresholds, ceiling, hourly);
      monthStats.set(key, stats);
      months.push({
        key,
        year: ym.year,
        month: ym.month,
        ...withCoverage(stats, dim, inRange, stats.daysObserved >= MIN_DAYS_FOR_MONTH),
      });
    }
  }

  const seasonGroups = new Map<string, { start: { year: number; month: number }; months: MonthProfile[] }>();
  for (const m of months) {
    const start = seasonStart(m.year, m.month);
    const key = monthKey(start.year, start.month);
    const group = seasonGroups.get(key);
    if (group) group.months.push(m);
    else seasonGroups.set(key, { start, months: [m] });
  }
  const seasons: SeasonPeriodProfile[] = [...seasonGroups.values()].map(({ start, months: ms }) => {
    const end = addMonths(start.year, start.month, 2);
    const season = SEASON_BY_START[hemisphere][start.month];
    const label =
      start.month === 12 ? `${season} ${start.year}–${String((start.year + 1) % 100).padStart(2, "0")}` : `${season} ${start.year}`;
    const daysInPeriod = [0, 1, 2].reduce((n, i) => {
      const ym = addMonths(start.year, start.month, i);
      return n + daysInMonth(ym.year, ym.month);
    }, 0);
    const stats = aggregate(ms.flatMap((m) => monthDays.get(m.key)!), thresholds, ceiling, mergeSorted(ms.map((m) => monthHourly.get(m.key)!)));
    const enough = ms.length === 3 && ms.every((m) => m.coverage.enough);
    return {
      key: `${monthKey(start.year, start.month)}/${monthKey(end.year, end.month)}`,
      season,
      label,
      months: ms.map((m) => m.key),
      ...withCoverage(stats, daysInPeriod, ms.reduce((n, m) => n + m.coverage.daysInRange, 0), enough),
    };
  });

  const year: MonthOfYearProfile[] = MONTH_NAMES.map((name, i) => {
    const month = i + 1;
    const included = months.filter((m) => m.month === month);
    const stats =
      included.length === 1
        ? monthStats.get(included[0].key)!
        : aggregate(included.flatMap((m) => monthDays.get(m.key)!), thresholds, ceiling, mergeSorted(included.map((m) => monthHourly.get(m.key)!)));
    return {
      key: String(month).padStart(2, "0"),
      month,
      name,
      monthsIncluded: included.map((m) => m.key),
      ...withCoverage(
        stats,
        included.reduce((n, m) => n + m.coverage.daysInPeriod, 0),
        included.reduce((n, m) => n + m.coverage.daysInRange, 0),
        stats.daysObserved >= MIN_DAYS_FOR_MONTH,
      ),
    };
  });

  const daySummaries: DaySummary[] = orderedDays.map((d) => ({
    key: dayKey(d.date),
    monthKey: monthKey(d.date.year, d.date.month),
    month: d.date.month,
    dayNumber: d.dayNumber,
    hoursObserved: d.hours,
    complete: d.hours >= MIN_HOURS_FOR_DAY,
    low: finiteOrNull(d.low),
    high: finiteOrNull(d.high),
    dayHours: d.dayN,
    nightHours: d.nightN,
    dayNightDifference: dayNightDifference(d),
    lightHours: d.lightHours,
    dli: dayDli(d),
    temps: d.tempMeans,
    rhLow: finiteOrNull(d.rhLow),
  }));

  const nightSummaries: NightSummary[] = [...nights.values()]
    .sort((a, b) => a.dayNumber - b.dayNumber)
    .map((n) => {
      const date = dateOfDayNumber(n.dayNumber);
      return { key: dayKey(date), month: date.month, dayNumber: n.dayNumber, hoursObserved: n.hours, low: n.low, temps: n.temps };
    });

  return {
    timeZone: site.timeZone,
    hemisphere,
    from: opts.from,
    to: opts.to,
    thresholds,
    luxPerPpfd,
    luxClipped: clippingIn(orderedDays, ceiling),
    months,
    seasons,
    year,
    days: daySummaries,
    nights: nightSummaries,
  };
}
