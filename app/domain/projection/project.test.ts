import { describe, expect, it } from "vitest";
import type { MonthOfYearProfile } from "~/domain/season/types";
import { combineMonths } from "~/domain/projection/combine";
import type { ProjectedMonth } from "~/domain/projection/project";

const fig = (value: number, spread = 1) => ({ value, low: value - spread, high: value + spread });
const projected = (month: number): ProjectedMonth => ({
  month,
  source: "projected",
  measuredDays: 0,
  daysInMonth: 31,
  years: 10,
  figures: {
    meanDailyLow: fig(5),
    meanDailyHigh: fig(12),
    lowest: fig(-2, 2),
    highest: fig(18, 2),
    p05: fig(3),
    p95: fig(15),
    meanDayNightDifference: fig(4, 0.5),
    humidityMean: fig(70, 5),
    humidityLowest: fig(40, 5),
    humidityHighest: fig(95, 3),
    below: [{ thresholdC: 10, hours: fig(400, 50), nights: fig(25, 3) }],
  },
});
const measured = (month: number, daysObserved: number, enough: boolean) =>
  ({
    month,
    key: String(month).padStart(2, "0"),
    name: "",
    monthsIncluded: ["2026-01"],
    temperature: {
      lowest: -4,
      highest: 16,
      p05: 2,
      p95: 14,
      meanDailyLow: 4,
      meanDailyHigh: 11,
      meanDayNightDifference: 5,
      daysWithDayAndNight: daysObserved,
    },
    humidity: { lowest: 45, highest: 97, mean: 75 },
    below: [{ thresholdC: 10, hours: 100, nights: 8 }],
    condensationHours: 0,
    light: { meanDli: null, daysWithLight: 0 },
    coverage: { hoursObserved: daysObserved * 24, daysObserved, daysInPeriod: 31, daysInRange: 31, enough },
  }) as MonthOfYearProfile;

describe("combineMonths", () => {
  it("a measured month wins outright, with no interval", () => {
    const [m] = combineMonths([projected(1)], [measured(1, 25, true)]);
    expect(m.source).toBe("measured");
    expect(m.figures.meanDailyLow).toEqual({ value: 4, low: 4, high: 4 });
    expect(m.years).toBe(0);
  });

  it("a month partly measured blends by its share of days measured, narrows the interval, and keeps a measured extreme", () => {
    const [m] = combineMonths([projected(1)], [measured(1, 10, false)]);
    expect(m.source).toBe("blended");
    expect(m.measuredDays).toBe(10);
    const w = 10 / 31;
    expect(m.figures.meanDailyLow!.value).toBeCloseTo(w * 4 + (1 - w) * 5, 6);
    expect(m.figures.meanDailyLow!.high - m.figures.meanDailyLow!.low).toBeCloseTo(2 * (1 - w), 6);
    // The measured −4 °C is already colder than the projected −2 °C: it stands.
    expect(m.figures.lowest!.value).toBe(-4);
    // Hours below the line: those measured plus the projection's share for the days still to come.
    expect(m.figures.below[0].hours.value).toBeCloseTo(100 + (1 - w) * 400, 6);
  });

  it("a month with no days measured stays projected", () => {
    const [m] = combineMonths([projected(2)], [measured(2, 0, false)]);
    expect(m.source).toBe("projected");
  });
});
