// The statistics of a period (a month, a season, a month of the year across years) from its days:
// lowest and highest, percentiles of the hourly means, mean daily low and high, day–night
// difference, humidity, hours under the lines, light, and the light sensor's ceiling.
import { quantileSorted } from "simple-statistics";
import { dayDli, dayNightDifference, finiteOrNull, meanOrNull, type DayAgg } from "~/domain/season/days";
import {
  CLIP_MIN_DAYS,
  CLIP_MIN_HOURS,
  CLIP_MIN_LUX,
  CLIP_TOLERANCE,
  MIN_HOURS_FOR_DAY,
} from "~/domain/season/thresholds";
import type { LuxClipping, PeriodStats } from "~/domain/season/types";

export type Stats = Omit<PeriodStats, "coverage"> & { hoursObserved: number; daysObserved: number };

/** The sensor's ceiling and the lowest reading counted as at it, or null when the light does not clip. */
export type Ceiling = { lux: number; edge: number };

/** Looks for a flat top in the hours' highest lux readings (see CLIP_TOLERANCE). */
export function findLuxCeiling(days: DayAgg[]): Ceiling | null {
  let top = -Infinity;
  for (const d of days) for (const v of d.luxTops) if (v > top) top = v;
  if (!(top >= CLIP_MIN_LUX)) return null;
  const edge = top * (1 - CLIP_TOLERANCE);
  const shoulder = top * 0.9;
  let at = 0,
    daysAt = 0,
    near = 0;
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
export function clippingIn(days: DayAgg[], ceiling: Ceiling | null): LuxClipping | null {
  if (!ceiling) return null;
  let hours = 0,
    withHours = 0;
  for (const d of days) {
    let here = 0;
    for (const v of d.luxTops) if (v >= ceiling.edge) here++;
    hours += here;
    if (here > 0) withHours++;
  }
  return hours > 0 ? { ceilingLux: ceiling.lux, hours, days: withHours } : null;
}

/** Hourly means of the days, sorted; typed arrays sort numerically and fast. */
export function sortedHourlyMeans(days: DayAgg[]): Float64Array {
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
export function mergeSorted(parts: Float64Array[]): Float64Array {
  if (parts.length === 1) return parts[0];
  let merged: Float64Array = new Float64Array(0);
  for (const part of parts) {
    const out = new Float64Array(merged.length + part.length);
    let i = 0,
      j = 0,
      k = 0;
    while (i < merged.length && j < part.length) out[k++] = merged[i] <= part[j] ? merged[i++] : part[j++];
    while (i < merged.length) out[k++] = merged[i++];
    while (j < part.length) out[k++] = part[j++];
    merged = out;
  }
  return merged;
}

/** `hourly`: the days' hourly mean temperatures, sorted (the caller may have them already). */
export function aggregate(
  days: DayAgg[],
  thresholds: number[],
  ceiling: Ceiling | null,
  hourly: Float64Array = sortedHourlyMeans(days),
): Stats {
  const complete = days.filter((d) => d.hours >= MIN_HOURS_FOR_DAY);
  const difs: number[] = [];
  const dlis: number[] = [];
  let lowest = Infinity,
    highest = -Infinity,
    rhLow = Infinity,
    rhHigh = -Infinity;
  let condensationHours = 0,
    rhSum = 0,
    rhN = 0,
    hoursObserved = 0;
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

export function withCoverage(s: Stats, daysInPeriod: number, daysInRange: number, enough: boolean): PeriodStats {
  const { hoursObserved, daysObserved, ...rest } = s;
  return { ...rest, coverage: { hoursObserved, daysObserved, daysInPeriod, daysInRange, enough } };
}
