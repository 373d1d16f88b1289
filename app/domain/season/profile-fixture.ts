// Hourly rollups made up for the season profile's tests: a site or two, one hour's rollup from a
// few figures, the UTC hours between two instants, and a synthetic London year.
import type { HourlyRollup, Site } from "~/domain/season/types";

export const HOUR = 3_600_000;
export const london: Site = { latitude: 51.5074, longitude: -0.1278, timeZone: "Europe/London" };
// An invented garden near 34° S (Sydney's time zone).
export const southern: Site = { latitude: -33.9, longitude: 151.2, timeZone: "Australia/Sydney" };

export type Hour = { t?: number; tMin?: number; tMax?: number; rh?: number; lux?: number; dp?: number | null };

export function rollup(ms: number, h: Hour): HourlyRollup {
  const n = 6;
  return {
    hour: new Date(ms),
    tN: h.t === undefined ? 0 : n,
    tMin: h.t === undefined ? null : (h.tMin ?? h.t),
    tMax: h.t === undefined ? null : (h.tMax ?? h.t),
    tSum: h.t === undefined ? null : h.t * n,
    hN: h.rh === undefined ? 0 : n,
    hMin: h.rh === undefined ? null : h.rh - 5,
    hMax: h.rh === undefined ? null : h.rh + 5,
    hSum: h.rh === undefined ? null : h.rh * n,
    dpMarginMin: h.dp === undefined ? 5 : h.dp,
    luxN: h.lux === undefined ? 0 : n,
    luxSum: h.lux === undefined ? null : h.lux * n,
  };
}

// Local clock for building fixtures, asked of Intl on every hour: independent of the
// once-per-day offset cache under test.
export function localParts(ms: number, timeZone: string) {
  const parts = new Intl.DateTimeFormat("en-GB", {
    timeZone,
    hourCycle: "h23",
    year: "numeric",
    month: "numeric",
    day: "numeric",
    hour: "numeric",
  }).formatToParts(new Date(ms));
  const get = (type: string) => Number(parts.find((p) => p.type === type)!.value);
  return { year: get("year"), month: get("month"), day: get("day"), hour: get("hour") };
}

/** Every UTC hour in [from, to) is the start of exactly one local hour in whole-hour zones. */
export function hoursBetween(from: string, to: string): number[] {
  const out: number[] = [];
  for (let ms = Date.parse(from); ms < Date.parse(to); ms += HOUR) out.push(ms);
  return out;
}

// Synthetic London year: night value N for local hours 0–7 and 20–23, N + 8 for 8–19,
// each hour's min/max one degree either side of its mean.
export const NIGHTS = [2, 3, 5, 7, 10, 13, 15, 15, 12, 9, 5, 3];
export function londonYear(): HourlyRollup[] {
  return hoursBetween("2025-01-01T00:00:00Z", "2026-01-01T00:00:00Z").map((ms) => {
    const p = localParts(ms, london.timeZone);
    const n = NIGHTS[p.month - 1];
    const t = p.hour >= 8 && p.hour < 20 ? n + 8 : n;
    return rollup(ms, { t, tMin: t - 1, tMax: t + 1, rh: 40 + p.month * 3 });
  });
}
export const yearOpts = { from: new Date("2025-01-01T00:00:00Z"), to: new Date("2026-01-01T00:00:00Z") };
