// Projected months: a spot's response model played through the site's past years of weather,
// giving for every month of the year the season profile's figures with an 80 % interval that holds
// both the year-to-year weather and the model's own error. Measured months always win; a month
// partly measured blends the two and says so. Pure: no I/O.
import type { Site } from "~/domain/season/types";
import { DEFAULT_THRESHOLDS_C, MIN_HOURS_FOR_DAY, NIGHT_END_HOUR, NIGHT_START_HOUR } from "~/domain/season/thresholds";
import { drivers, HOUR_MS, type Drivers, type OutdoorSeries } from "~/domain/projection/drivers";
import { predictHour, type ResponseModel } from "~/domain/projection/response";
import { saturationVapourPressure } from "~/domain/climate/psychro";
import { mulberry32 } from "~/lib/random";

/** A figure and its 80 % interval. */
export type Figure = { value: number; low: number; high: number };

export type MonthFigures = {
  meanDailyLow: Figure | null;
  meanDailyHigh: Figure | null;
  lowest: Figure | null;
  highest: Figure | null;
  p05: Figure | null;
  p95: Figure | null;
  meanDayNightDifference: Figure | null;
  humidityMean: Figure | null;
  humidityLowest: Figure | null;
  humidityHighest: Figure | null;
  /** Hours and nights below each line, per month. */
  below: { thresholdC: number; hours: Figure; nights: Figure }[];
};

export type MonthSource = "measured" | "projected" | "blended";

export type ProjectedMonth = {
  month: number; // 1–12
  source: MonthSource;
  /** Days measured in this month of the year, and its days. */
  measuredDays: number;
  daysInMonth: number;
  figures: MonthFigures;
  /** Past years of weather the projection played through (0 for a measured month). */
  years: number;
};

const Z80 = 1.2816;
// How much a month's outdoor mean outside those the fit saw widens the model's error, °C per °C
// (chosen on the simulator's spots so that about 80 % of months fall inside; see the accuracy test).
const EXTRAPOLATION_ERROR_PER_C = 0.3;

function quantile(sorted: number[], q: number): number {
  if (sorted.length === 1) return sorted[0];
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo);
}

/** Median across years, and an 80 % interval from the years' spread and the model's error σ. */
function figure(values: (number | null)[], sigma: number): Figure | null {
  const v = values.filter((x): x is number => x !== null && Number.isFinite(x)).sort((a, b) => a - b);
  if (v.length === 0) return null;
  const value = quantile(v, 0.5);
  const lo = value - quantile(v, 0.1);
  const hi = quantile(v, 0.9) - value;
  const model = Z80 * sigma;
  return { value, low: value - Math.sqrt(lo * lo + model * model), high: value + Math.sqrt(hi * hi + model * model) };
}

export type ProjectionOptions = {
  /** Calendar years (site-local) of weather to play through; each should be complete. */
  years: number[];
  thresholds?: number[];
  seed?: number;
};

/**
 * Plays `model` through the weather of `years` and returns the twelve months' projected figures,
 * computed by the season profile's rules (an own pass over the hours: building ten years of
 * rollup objects for seasonProfile took four times as long). `weather` must cover the years (and a
 * week before the first, for the smoothing to settle).
 */
export function projectYear(
  model: ResponseModel,
  weather: OutdoorSeries | Drivers,
  site: Site,
  opts: ProjectionOptions,
): ProjectedMonth[] {
  const d = "smooth" in weather ? weather : drivers(weather, site.timeZone);
  const rand = mulberry32(opts.seed ?? 1);
  const years = [...opts.years].sort((a, b) => a - b);
  const thresholds = [...new Set([...DEFAULT_THRESHOLDS_C, ...(opts.thresholds ?? [])])].sort((a, b) => a - b);
  const first = Math.max(0, Math.floor((Date.UTC(years[0], 0, 1) - d.start) / HOUR_MS) - 24);
  const last = Math.min(d.n, Math.ceil((Date.UTC(years[years.length - 1] + 1, 0, 1) - d.start) / HOUR_MS) + 24);
  const wanted = new Set(years);
  const x = new Float64Array(13);
  const blocks = model.residualDays;
  let block: number[] = [0];
  const { lowOffsetC, highOffsetC } = model;
  const stats = new Map<number, MonthAcc>();
  let day: DayAcc | null = null;
  let night: { key: number; low: number; hours: number } | null = null;
  const closeDay = () => {
    if (day && day.acc) finishDay(day, day.acc);
  };
  for (let i = first; i < last; i++) {
    const ld = d.localDay[i];
    const h = d.hourOfDay[i];
    if (!day || day.dayNumber !== ld) {
      closeDay();
      block = blocks.length > 0 ? blocks[Math.floor(rand() * blocks.length)] : [0];
      const date = new Date(ld * 86_400_000);
      const year = date.getUTCFullYear();
      const key = year * 100 + date.getUTCMonth() + 1;
      let acc = stats.get(key);
      if (!acc && wanted.has(year)) stats.set(key, (acc = newMonth(thresholds.length)));
      day = {
        dayNumber: ld,
        acc: acc ?? null,
        hours: 0,
        low: Infinity,
        high: -Infinity,
        daySum: 0,
        dayN: 0,
        nightSum: 0,
        nightN: 0,
      };
    }
    const p = predictHour(model, d, i, x) + block[h % block.length];
    const acc = day.acc;
    // Nights run NIGHT_START_HOUR to NIGHT_END_HOUR and belong to the day they start on.
    if (h >= NIGHT_START_HOUR || h < NIGHT_END_HOUR) {
      const key = h >= NIGHT_START_HOUR ? ld : ld - 1;
      if (!night || night.key !== key) {
        if (night) finishNight(night, stats, thresholds);
        night = { key, low: Infinity, hours: 0 };
      }
      night.low = Math.min(night.low, p + lowOffsetC);
      night.hours++;
    }
    if (!acc) continue;
    day.hours++;
    day.low = Math.min(day.low, p + lowOffsetC);
    day.high = Math.max(day.high, p + highOffsetC);
    if (d.sun[i] > 0) {
      day.daySum += p;
      day.dayN++;
    } else {
      day.nightSum += p;
      day.nightN++;
    }
    if (acc.nHourly < acc.hourly.length) acc.hourly[acc.nHourly++] = p;
    for (let k = 0; k < thresholds.length; k++) if (p < thresholds[k]) acc.belowHours[k]++;
    acc.outdoorSum += d.now[i];
    if (model.vapourExcessHpa !== null) {
      const e = d.outdoorVapour[i] + model.vapourExcessHpa;
      const rh = Math.max(1, Math.min(100, (100 * e) / saturationVapourPressure(p)));
      acc.rhSum += rh;
      acc.rhN++;
      if (rh < acc.rhLow) acc.rhLow = rh;
      if (rh > acc.rhHigh) acc.rhHigh = rh;
    }
  }
  closeDay();
  if (night) finishNight(night, stats, thresholds);

  const q = model.quality;
  // The model's own error on a month's figures: its bias on held-out days and a share of its
  // day-to-day error (days average out within a month, a bias does not).
  const base2 = q ? q.biasC ** 2 + ((q.dailyLowMaeC + q.dailyHighMaeC) / 2) ** 2 / 2 : 1;
  const out: ProjectedMonth[] = [];
  for (let month = 1; month <= 12; month++) {
    const months = years
      .map((y) => stats.get(y * 100 + month))
      .filter((m): m is MonthAcc => !!m && m.completeDays >= 20)
      .map(summarise);
    const outdoorMean = months.length ? months.reduce((a, m) => a + m.outdoorMean, 0) / months.length : NaN;
    const [lo, hi] = model.outdoorRange;
    const beyond = Number.isFinite(outdoorMean) ? Math.max(0, lo - outdoorMean, outdoorMean - hi) : 0;
    const sigma = Math.sqrt(base2 + (EXTRAPOLATION_ERROR_PER_C * beyond) ** 2);
    const pick = (f: (m: MonthSummary) => number | null, s = sigma) => figure(months.map(f), s);
    const humid = model.vapourExcessHpa !== null;
    out.push({
      month,
      source: "projected",
      measuredDays: 0,
      daysInMonth: new Date(Date.UTC(2001, month, 0)).getUTCDate(),
      years: months.length,
      figures: {
        meanDailyLow: pick((m) => m.meanDailyLow),
        meanDailyHigh: pick((m) => m.meanDailyHigh),
        lowest: pick((m) => m.lowest, sigma * 1.5),
        highest: pick((m) => m.highest, sigma * 1.5),
        p05: pick((m) => m.p05),
        p95: pick((m) => m.p95),
        meanDayNightDifference: pick((m) => m.meanDayNightDifference, sigma / 2),
        // Humidity follows the outdoor vapour plus the spot's own excess; its error is taken as
        // 3 % RH per °C of the temperature's (RH moves about 3–6 % per °C near room temperature).
        humidityMean: humid ? pick((m) => m.humidityMean, 3 * sigma) : null,
        humidityLowest: humid ? pick((m) => m.humidityLowest, 3 * sigma) : null,
        humidityHighest: humid ? pick((m) => m.humidityHighest, 3 * sigma) : null,
        below:
          months.length === 0
            ? []
            : thresholds.map((thresholdC, k) => ({
                thresholdC,
                hours: figure(
                  months.map((m) => m.belowHours[k]),
                  0,
                )!,
                nights: figure(
                  months.map((m) => m.belowNights[k]),
                  0,
                )!,
              })),
      },
    });
  }
  return out;
}

type DayAcc = {
  dayNumber: number;
  acc: MonthAcc | null;
  hours: number;
  low: number;
  high: number;
  daySum: number;
  dayN: number;
  nightSum: number;
  nightN: number;
};
type MonthAcc = {
  hourly: Float64Array;
  nHourly: number;
  lowSum: number;
  highSum: number;
  completeDays: number;
  lowest: number;
  highest: number;
  difSum: number;
  difN: number;
  belowHours: number[];
  belowNights: number[];
  outdoorSum: number;
  rhSum: number;
  rhN: number;
  rhLow: number;
  rhHigh: number;
};
type MonthSummary = {
  meanDailyLow: number;
  meanDailyHigh: number;
  lowest: number;
  highest: number;
  p05: number;
  p95: number;
  meanDayNightDifference: number | null;
  humidityMean: number | null;
  humidityLowest: number | null;
  humidityHighest: number | null;
  belowHours: number[];
  belowNights: number[];
  outdoorMean: number;
};

function newMonth(nThresholds: number): MonthAcc {
  return {
    hourly: new Float64Array(24 * 31 + 2),
    nHourly: 0,
    lowSum: 0,
    highSum: 0,
    completeDays: 0,
    lowest: Infinity,
    highest: -Infinity,
    difSum: 0,
    difN: 0,
    belowHours: new Array(nThresholds).fill(0),
    belowNights: new Array(nThresholds).fill(0),
    outdoorSum: 0,
    rhSum: 0,
    rhN: 0,
    rhLow: Infinity,
    rhHigh: -Infinity,
  };
}

// The season profile's rules (domain/season/thresholds.ts): a day counts with MIN_HOURS_FOR_DAY
// hours; an hour is day when the sun is up; a night is counted below a line when any hour of it is.
function finishDay(day: DayAcc, acc: MonthAcc) {
  if (day.hours === 0) return;
  acc.lowest = Math.min(acc.lowest, day.low);
  acc.highest = Math.max(acc.highest, day.high);
  if (day.hours >= MIN_HOURS_FOR_DAY) {
    acc.lowSum += day.low;
    acc.highSum += day.high;
    acc.completeDays++;
  }
  if (day.dayN > 0 && day.nightN > 0) {
    acc.difSum += day.daySum / day.dayN - day.nightSum / day.nightN;
    acc.difN++;
  }
}

function finishNight(
  night: { key: number; low: number; hours: number },
  stats: Map<number, MonthAcc>,
  thresholds: number[],
) {
  const date = new Date(night.key * 86_400_000);
  const acc = stats.get(date.getUTCFullYear() * 100 + date.getUTCMonth() + 1);
  if (!acc) return;
  for (let k = 0; k < thresholds.length; k++) if (night.low < thresholds[k]) acc.belowNights[k]++;
}

function summarise(m: MonthAcc): MonthSummary {
  const sorted = m.hourly.subarray(0, m.nHourly).sort();
  return {
    meanDailyLow: m.lowSum / m.completeDays,
    meanDailyHigh: m.highSum / m.completeDays,
    lowest: m.lowest,
    highest: m.highest,
    p05: quantile(sorted as unknown as number[], 0.05),
    p95: quantile(sorted as unknown as number[], 0.95),
    meanDayNightDifference: m.difN > 0 ? m.difSum / m.difN : null,
    humidityMean: m.rhN > 0 ? m.rhSum / m.rhN : null,
    humidityLowest: m.rhN > 0 ? m.rhLow : null,
    humidityHighest: m.rhN > 0 ? m.rhHigh : null,
    belowHours: m.belowHours,
    belowNights: m.belowNights,
    outdoorMean: m.outdoorSum / m.nHourly,
  };
}
