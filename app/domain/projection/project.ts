// Projected months: a spot's response model played through the site's past years of weather,
// giving for every month of the year the season profile's figures with an 80 % interval that holds
// both the year-to-year weather and the model's own error. Measured months always win; a month
// partly measured blends the two and says so. Pure: no I/O.
import type { HourlyRollup, MonthOfYearProfile, Site } from "~/domain/season/types";
import { seasonProfile } from "~/domain/season/profile";
import { drivers, HOUR_MS, predictHour, saturationHpa, type Drivers, type OutdoorSeries, type ResponseModel } from "./response";

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

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

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
 * Plays `model` through the weather of `years` and returns the twelve months' projected figures.
 * `weather` must cover the years (and a week before the first, for the smoothing to settle).
 */
export function projectYear(model: ResponseModel, weather: OutdoorSeries | Drivers, site: Site, opts: ProjectionOptions): ProjectedMonth[] {
  const d = "smooth" in weather ? weather : drivers(weather, site.timeZone);
  const rand = mulberry32(opts.seed ?? 1);
  const years = [...opts.years].sort((a, b) => a - b);
  const from = new Date(Date.UTC(years[0], 0, 1));
  const to = new Date(Date.UTC(years[years.length - 1] + 1, 0, 1));
  const first = Math.max(0, Math.floor((from.getTime() - d.start) / HOUR_MS) - 24);
  const last = Math.min(d.n, Math.ceil((to.getTime() - d.start) / HOUR_MS) + 24);
  const rollups: HourlyRollup[] = [];
  const half = model.hourSpreadC / 2;
  const x = new Float64Array(13);
  const blocks = model.residualDays;
  let block: number[] = [];
  // Outdoor daily means per month-of-year of each year, for the extrapolation term.
  const outdoorByMonth = new Map<string, { sum: number; n: number }>();
  for (let i = first; i < last; i++) {
    if (d.hourOfDay[i] === 0 || block.length === 0) block = blocks.length > 0 ? blocks[Math.floor(rand() * blocks.length)] : [0];
    const p = predictHour(model, d, i, x) + block[d.hourOfDay[i] % block.length];
    let rh: number | null = null;
    if (model.vapourExcessHpa !== null) {
      const e = d.outdoorVapour[i] + model.vapourExcessHpa;
      rh = Math.max(1, Math.min(100, (100 * e) / saturationHpa(p)));
    }
    const t = d.start + i * HOUR_MS;
    rollups.push({
      hour: new Date(t),
      tN: 1,
      tMin: p - half,
      tMax: p + half,
      tSum: p,
      hN: rh === null ? 0 : 1,
      hMin: rh,
      hMax: rh,
      hSum: rh,
      dpMarginMin: null,
      luxN: 0,
      luxSum: null,
    });
    const key = new Date(t).toISOString().slice(0, 7);
    const acc = outdoorByMonth.get(key) ?? { sum: 0, n: 0 };
    acc.sum += d.now[i];
    acc.n++;
    outdoorByMonth.set(key, acc);
  }
  const profile = seasonProfile(rollups, site, { from, to, thresholds: opts.thresholds });
  const q = model.quality;
  // The model's own error on a month's figures: its bias on held-out days and a share of its
  // day-to-day error (days average out within a month, a bias does not).
  const base2 = q ? q.biasC ** 2 + ((q.dailyLowMaeC + q.dailyHighMaeC) / 2) ** 2 / 2 : 1;
  const out: ProjectedMonth[] = [];
  for (let month = 1; month <= 12; month++) {
    const months = profile.months.filter((m) => m.month === month && m.coverage.enough);
    const mm = String(month).padStart(2, "0");
    const outdoor = years.map((y) => outdoorByMonth.get(`${y}-${mm}`)).filter((a) => a && a.n > 0).map((a) => a!.sum / a!.n);
    const outdoorMean = outdoor.length ? outdoor.reduce((a, b) => a + b, 0) / outdoor.length : NaN;
    const [lo, hi] = model.outdoorRange;
    const beyond = Number.isFinite(outdoorMean) ? Math.max(0, lo - outdoorMean, outdoorMean - hi) : 0;
    const sigma = Math.sqrt(base2 + (EXTRAPOLATION_ERROR_PER_C * beyond) ** 2);
    const pick = (f: (m: (typeof months)[number]) => number | null, s = sigma) => figure(months.map(f), s);
    out.push({
      month,
      source: "projected",
      measuredDays: 0,
      daysInMonth: months[0]?.coverage.daysInPeriod ?? 30,
      years: months.length,
      figures: {
        meanDailyLow: pick((m) => m.temperature.meanDailyLow),
        meanDailyHigh: pick((m) => m.temperature.meanDailyHigh),
        lowest: pick((m) => m.temperature.lowest, sigma * 1.5),
        highest: pick((m) => m.temperature.highest, sigma * 1.5),
        p05: pick((m) => m.temperature.p05),
        p95: pick((m) => m.temperature.p95),
        meanDayNightDifference: pick((m) => m.temperature.meanDayNightDifference, sigma / 2),
        // Humidity follows the outdoor vapour plus the spot's own excess: its error is wider (memory-free guess: 3 % RH per °C).
        humidityMean: model.vapourExcessHpa === null ? null : pick((m) => m.humidity.mean, 3 * sigma),
        humidityLowest: model.vapourExcessHpa === null ? null : pick((m) => m.humidity.lowest, 3 * sigma),
        humidityHighest: model.vapourExcessHpa === null ? null : pick((m) => m.humidity.highest, 3 * sigma),
        below: profile.thresholds.map((thresholdC, k) => ({
          thresholdC,
          hours: figure(months.map((m) => m.below[k].hours), 0)!,
          nights: figure(months.map((m) => m.below[k].nights), 0)!,
        })).filter((b) => b.hours && b.nights),
      },
    });
  }
  return out;
}

const exact = (v: number | null): Figure | null => (v === null ? null : { value: v, low: v, high: v });

/** The measured figures of a month of the year, as figures with no interval. */
export function measuredFigures(m: MonthOfYearProfile): MonthFigures {
  return {
    meanDailyLow: exact(m.temperature.meanDailyLow),
    meanDailyHigh: exact(m.temperature.meanDailyHigh),
    lowest: exact(m.temperature.lowest),
    highest: exact(m.temperature.highest),
    p05: exact(m.temperature.p05),
    p95: exact(m.temperature.p95),
    meanDayNightDifference: exact(m.temperature.meanDayNightDifference),
    humidityMean: exact(m.humidity.mean),
    humidityLowest: exact(m.humidity.lowest),
    humidityHighest: exact(m.humidity.highest),
    below: m.below.map((b) => ({ thresholdC: b.thresholdC, hours: exact(b.hours)!, nights: exact(b.nights)! })),
  };
}

function blend(measured: Figure | null, projected: Figure | null, w: number, kind: "mean" | "min" | "max"): Figure | null {
  if (!measured) return projected;
  if (!projected) return measured;
  const m = measured.value;
  if (kind !== "mean") {
    // An extreme already measured stands; the rest of the month can only add to it.
    const pick = kind === "min" ? Math.min : Math.max;
    const value = pick(m, projected.value);
    return { value, low: kind === "min" ? Math.min(m, projected.low) : m, high: kind === "max" ? Math.max(m, projected.high) : m };
  }
  const value = w * m + (1 - w) * projected.value;
  return { value, low: value - (1 - w) * (projected.value - projected.low), high: value + (1 - w) * (projected.high - projected.value) };
}

/**
 * Measured months win (enough days, as the season profile counts them); a month with some days
 * measured blends them with the projection, weighted by the share of its days measured.
 */
export function combineMonths(projected: ProjectedMonth[], measured: MonthOfYearProfile[]): ProjectedMonth[] {
  return projected.map((p) => {
    const m = measured.find((x) => x.month === p.month);
    if (!m || m.coverage.daysObserved === 0) return p;
    const days = m.coverage.daysObserved;
    const daysInMonth = m.coverage.daysInPeriod / Math.max(1, m.monthsIncluded.length);
    if (m.coverage.enough) return { month: p.month, source: "measured", measuredDays: days, daysInMonth, figures: measuredFigures(m), years: 0 };
    const w = Math.min(1, days / daysInMonth);
    const mf = measuredFigures(m);
    const f = p.figures;
    return {
      month: p.month,
      source: "blended",
      measuredDays: days,
      daysInMonth,
      years: p.years,
      figures: {
        meanDailyLow: blend(mf.meanDailyLow, f.meanDailyLow, w, "mean"),
        meanDailyHigh: blend(mf.meanDailyHigh, f.meanDailyHigh, w, "mean"),
        lowest: blend(mf.lowest, f.lowest, w, "min"),
        highest: blend(mf.highest, f.highest, w, "max"),
        p05: blend(mf.p05, f.p05, w, "mean"),
        p95: blend(mf.p95, f.p95, w, "mean"),
        meanDayNightDifference: blend(mf.meanDayNightDifference, f.meanDayNightDifference, w, "mean"),
        humidityMean: blend(mf.humidityMean, f.humidityMean, w, "mean"),
        humidityLowest: blend(mf.humidityLowest, f.humidityLowest, w, "min"),
        humidityHighest: blend(mf.humidityHighest, f.humidityHighest, w, "max"),
        below: f.below.map((b) => {
          const mb = mf.below.find((x) => x.thresholdC === b.thresholdC);
          if (!mb) return b;
          // Hours below: those measured plus the projection's share for the days not yet measured.
          const add = (x: Figure, y: Figure): Figure => ({ value: x.value + (1 - w) * y.value, low: x.value + (1 - w) * y.low, high: x.value + (1 - w) * y.high });
          return { thresholdC: b.thresholdC, hours: add(mb.hours, b.hours), nights: add(mb.nights, b.nights) };
        }),
      },
    };
  });
}
