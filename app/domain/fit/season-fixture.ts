// Test support only: builds a spot's season profile for 2025 from synthetic hourly rollups, so
// fit tests can set each month's nights, days, humidity and light and then nudge single days.
import * as SunCalc from "suncalc";
import { seasonProfile } from "~/domain/season/profile";
import type { HourlyRollup, SeasonProfile, Site } from "~/domain/season/types";

export const FIXTURE_SITE: Site = { latitude: 51.5, longitude: 0, timeZone: "UTC" };

export type MonthSpec = {
  night: number; // °C in hours whose midpoint is outside sunrise–sunset
  day: number; // °C in sun-up hours
  rh?: number; // % all month
  rhDay?: number; // % in sun-up hours (overrides rh by day)
  rhNight?: number; // % in the other hours
  lux?: number; // sun-up hours only; undefined: no light sensor
  dpMargin?: number; // °C all month
};

export type HourPatch = {
  month: number;
  dayOfMonth: number;
  hour: number;
  value: { t?: number; rh?: number; dp?: number };
};

export type SpotYearSpec = {
  month?: (month: number) => MonthSpec;
  /** Months (1–12) with readings; the rest are left empty. */
  observed?: number[];
  patches?: HourPatch[];
  /** Keep only some days of the observed months. */
  keepDay?: (month: number, dayOfMonth: number) => boolean;
};

export const steadyRoom: (month: number) => MonthSpec = () => ({ night: 18, day: 24, rh: 60, dpMargin: 8 });

const HOUR = 3_600_000;
const sunCache = new Map<number, [number, number]>();

function sunFor(dayStart: number): [number, number] {
  let win = sunCache.get(dayStart);
  if (!win) {
    const t = SunCalc.getTimes(new Date(dayStart + 12 * HOUR), FIXTURE_SITE.latitude, FIXTURE_SITE.longitude);
    win = [t.sunrise!.getTime(), t.sunset!.getTime()];
    sunCache.set(dayStart, win);
  }
  return win;
}

export function spotYear(spec: SpotYearSpec = {}): SeasonProfile {
  const monthSpec = spec.month ?? steadyRoom;
  const observed = new Set(spec.observed ?? [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
  const patches = new Map((spec.patches ?? []).map((p) => [`${p.month}-${p.dayOfMonth}-${p.hour}`, p.value]));
  const rollups: HourlyRollup[] = [];
  const from = Date.UTC(2025, 0, 1);
  const to = Date.UTC(2026, 0, 1);
  for (let ms = from; ms < to; ms += HOUR) {
    const d = new Date(ms);
    const month = d.getUTCMonth() + 1;
    if (!observed.has(month) || (spec.keepDay && !spec.keepDay(month, d.getUTCDate()))) continue;
    const m = monthSpec(month);
    const [rise, set] = sunFor(ms - (ms % (24 * HOUR)));
    const up = ms + HOUR / 2 >= rise && ms + HOUR / 2 < set;
    const patch = patches.get(`${month}-${d.getUTCDate()}-${d.getUTCHours()}`) ?? {};
    const t = patch.t ?? (up ? m.day : m.night);
    const rh = patch.rh ?? (up ? m.rhDay : m.rhNight) ?? m.rh ?? 60;
    const lux = m.lux === undefined ? undefined : up ? m.lux : 0;
    rollups.push({
      hour: d,
      tN: 4,
      tMin: t,
      tMax: t,
      tSum: t * 4,
      hN: 4,
      hMin: rh,
      hMax: rh,
      hSum: rh * 4,
      dpMarginMin: patch.dp ?? m.dpMargin ?? 8,
      luxN: lux === undefined ? 0 : 4,
      luxSum: lux === undefined ? null : lux * 4,
    });
  }
  return seasonProfile(rollups, FIXTURE_SITE, { from: new Date(from), to: new Date(to) });
}

/**
 * Patches setting one hour (23:00, a night hour all year at 51.5° N) to `t` on the first `count`
 * days of a month: each is the night starting on that day (a night is counted by the date it starts).
 */
export function coldSnaps(month: number, count: number, t: number): HourPatch[] {
  return Array.from({ length: count }, (_, i) => ({ month, dayOfMonth: i + 1, hour: 23, value: { t } }));
}

/** Patches setting 13:00 UTC (a sun-up hour all year) to `t` on the first `count` days of a month. */
export function hotAfternoons(month: number, count: number, t: number): HourPatch[] {
  return Array.from({ length: count }, (_, i) => ({ month, dayOfMonth: i + 1, hour: 13, value: { t } }));
}
