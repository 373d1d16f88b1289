// A spot's coming hours and nights: the weather forecast played through the spot's response model,
// for forecast warnings (issue 16, part 6). Pure: no I/O.
//
// On clear, still nights leaves and flowers radiate to the sky and run a few degrees below the air
// a sensor in the shade measures: radiation frost (common practice: 1–3 °C below screen
// temperature; we take 2 °C for an outdoor spot with under 25 % cloud and wind under 8 km/h).
import { NIGHT_END_HOUR, NIGHT_START_HOUR } from "~/domain/season/thresholds";
import { HOUR_MS, type Drivers } from "~/domain/projection/drivers";
import { predictHour, type ResponseModel } from "~/domain/projection/response";

export const RADIATIVE_FROST = { maxCloudPercent: 25, maxWindKmh: 8, leafBelowAirC: 2 } as const;

/** Forecast error of the air temperature by lead time, °C (sd): about 1 °C the first day, growing (memory). */
const forecastSd = (leadHours: number) => 0.8 + 0.4 * (leadHours / 24);
const Z80 = 1.2816;

export type ForecastHour = {
  at: Date;
  /** Expected hourly mean at the spot, with the 80 % interval (model and forecast error). */
  expected: number;
  low: number;
  high: number;
  /** Clear and still: the air cools by radiation and plant surfaces run below it. */
  clearStill: boolean;
};

export type ForecastNight = {
  /** The local date the night starts on, "2026-12-03". */
  key: string;
  /** The hour of the expected lowest, and that low with its 80 % interval. */
  at: Date;
  expectedLow: number;
  lowerBound: number;
  /** For an outdoor spot on a clear, still night: the leaves' likely low (air low − 2 °C); else null. */
  leafLow: number | null;
  clearStill: boolean;
};

/**
 * The next `hours` hours from `from` (UTC ms, rounded down to the hour) where the drivers have
 * weather, and the nights (NIGHT_START_HOUR to NIGHT_END_HOUR local) that start in them.
 */
export function forecastSpot(
  model: ResponseModel,
  d: Drivers,
  from: number,
  opts: { hours?: number; outdoor: boolean },
): { hours: ForecastHour[]; nights: ForecastNight[] } {
  const residuals = model.residualDays.flat();
  const residualSd =
    residuals.length > 1 ? Math.sqrt(residuals.reduce((a, r) => a + r * r, 0) / (residuals.length - 1)) : 0.5;
  const first = Math.max(0, Math.floor((from - d.start) / HOUR_MS));
  const last = Math.min(d.n, first + (opts.hours ?? 48));
  const hours: ForecastHour[] = [];
  const x = new Float64Array(13);
  for (let i = first; i < last; i++) {
    const expected = predictHour(model, d, i, x);
    const sd = Math.sqrt(residualSd ** 2 + forecastSd(i - first) ** 2);
    const clearStill =
      d.cloud[i] <= RADIATIVE_FROST.maxCloudPercent && d.wind[i] <= RADIATIVE_FROST.maxWindKmh && d.sun[i] === 0;
    hours.push({
      at: new Date(d.start + i * HOUR_MS),
      expected,
      low: expected - Z80 * sd,
      high: expected + Z80 * sd,
      clearStill,
    });
  }
  const nights = new Map<number, ForecastNight>();
  for (let k = 0; k < hours.length; k++) {
    const i = first + k;
    const h = d.hourOfDay[i];
    if (!(h >= NIGHT_START_HOUR || h < NIGHT_END_HOUR)) continue;
    const startDay = h >= NIGHT_START_HOUR ? d.localDay[i] : d.localDay[i] - 1;
    const hour = hours[k];
    const night = nights.get(startDay);
    if (!night) {
      nights.set(startDay, {
        key: new Date(startDay * 86_400_000).toISOString().slice(0, 10),
        at: hour.at,
        expectedLow: hour.expected,
        lowerBound: hour.low,
        leafLow: null,
        clearStill: hour.clearStill,
      });
      continue;
    }
    if (hour.expected < night.expectedLow) {
      night.expectedLow = hour.expected;
      night.at = hour.at;
    }
    night.lowerBound = Math.min(night.lowerBound, hour.low);
    night.clearStill ||= hour.clearStill;
  }
  for (const n of nights.values()) {
    if (opts.outdoor && n.clearStill) n.leafLow = n.expectedLow - RADIATIVE_FROST.leafBelowAirC;
  }
  return { hours, nights: [...nights.values()] };
}
