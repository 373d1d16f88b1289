// Measured months and projected months of a spot, put together: a measured month wins, a month
// with some measured days is blended by how many, and an unmeasured month keeps its projection.
import type { Figure, MonthFigures, ProjectedMonth } from "~/domain/projection/project";
import type { MonthOfYearProfile } from "~/domain/season/types";

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

function blend(
  measured: Figure | null,
  projected: Figure | null,
  w: number,
  kind: "mean" | "min" | "max",
): Figure | null {
  if (!measured) return projected;
  if (!projected) return measured;
  const m = measured.value;
  if (kind !== "mean") {
    // An extreme already measured stands; the rest of the month can only add to it.
    const pick = kind === "min" ? Math.min : Math.max;
    const value = pick(m, projected.value);
    return {
      value,
      low: kind === "min" ? Math.min(m, projected.low) : m,
      high: kind === "max" ? Math.max(m, projected.high) : m,
    };
  }
  const value = w * m + (1 - w) * projected.value;
  return {
    value,
    low: value - (1 - w) * (projected.value - projected.low),
    high: value + (1 - w) * (projected.high - projected.value),
  };
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
    if (m.coverage.enough)
      return {
        month: p.month,
        source: "measured",
        measuredDays: days,
        daysInMonth,
        figures: measuredFigures(m),
        years: 0,
      };
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
          const add = (x: Figure, y: Figure): Figure => ({
            value: x.value + (1 - w) * y.value,
            low: x.value + (1 - w) * y.low,
            high: x.value + (1 - w) * y.high,
          });
          return { thresholdC: b.thresholdC, hours: add(mb.hours, b.hours), nights: add(mb.nights, b.nights) };
        }),
      },
    };
  });
}
