// One local day of a spot, aggregated from its hourly rollups: lows and highs, humidity, hours
// under the chosen lines, condensation hours, the day's and the night's means, light, and the
// nights counted with it. The season profile builds its periods from these.
import { mean } from "simple-statistics";
import * as SunCalc from "suncalc";
import { dateOfDayNumber, type LocalDate } from "~/domain/season/local-time";
import { CONDENSATION_MARGIN_C, MIN_LIGHT_HOURS_FOR_DLI } from "~/domain/season/thresholds";
import type { HourlyRollup, Site } from "~/domain/season/types";

export type DayAgg = {
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

export const HOUR_MS = 3_600_000;

export type Night = { dayNumber: number; low: number; hours: number; morningDay: number; temps: number[] };

const isValidDate = (d: Date | null | undefined): d is Date => d instanceof Date && !Number.isNaN(d.getTime());

const sunWindows = new Map<string, { sunUp: number; sunDown: number }>();
const SUN_CACHE_LIMIT = 100_000; // about 270 site-years; cleared rather than grown without bound

/** Sunrise and sunset of one local day (suncalc), remembered: they don't change between calls. */
export function sunWindow(noonMs: number, dayNumber: number, site: Site): { sunUp: number; sunDown: number } {
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

export function newDay(dayNumber: number, thresholdCount: number, sun: { sunUp: number; sunDown: number }): DayAgg {
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

export function addHour(day: DayAgg, r: HourlyRollup, ms: number, thresholds: number[], luxPerPpfd: number): void {
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

export const finiteOrNull = (v: number) => (Number.isFinite(v) ? v : null);
export const meanOrNull = (xs: number[]) => (xs.length > 0 ? mean(xs) : null);

export function dayNightDifference(d: DayAgg): number | null {
  return d.dayN > 0 && d.nightN > 0 ? d.daySum / d.dayN - d.nightSum / d.nightN : null;
}

export function dayDli(d: DayAgg): number | null {
  return d.lightHours >= MIN_LIGHT_HOURS_FOR_DLI ? d.dliSum : null;
}
