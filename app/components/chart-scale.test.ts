import { describe, expect, it } from "vitest";
import { calendarTicks } from "~/components/chart-calendar";
import { coverageLabel, stripTicks, timeTickLabels } from "~/components/chart-scale";

const at = (iso: string) => Date.parse(iso) / 1000;

describe("time axis labels in the site's locale (Intl, CLDR en-GB: day before month)", () => {
  it("writes 7 June as '7 Jun' on a month's axis, not the US '6/7'", () => {
    const splits = [at("2026-06-01T00:00:00+01:00"), at("2026-06-07T00:00:00+01:00"), at("2026-06-14T00:00:00+01:00")];
    expect(timeTickLabels(splits, "en-GB", "Europe/London")).toEqual(["1 Jun", "7 Jun", "14 Jun"]);
  });
  it("writes hours on a 48-hour axis, with the date at local midnight, in the site's zone", () => {
    const splits = [
      at("2026-06-06T18:00:00Z"),
      at("2026-06-06T23:00:00Z"),
      at("2026-06-07T11:00:00Z"),
      at("2026-06-08T11:00:00Z"),
    ];
    expect(timeTickLabels(splits, "en-GB", "Europe/London")).toEqual(["19:00", "7 Jun", "12:00", "12:00"]);
  });
  it("writes months over a year, the year on the first tick and on January, never milliseconds", () => {
    const splits = ["2025-12-01", "2026-01-01", "2026-02-01", "2026-11-01"].map((d) => at(`${d}T00:00:00Z`));
    expect(timeTickLabels(splits, "en-GB", "UTC")).toEqual(["Dec 2025", "Jan 2026", "Feb", "Nov"]);
  });
});

describe("year strip ticks in the grower's unit", () => {
  it("puts °F ticks on round °F values, not converted 5 °C steps (41°, 50°, 59°)", () => {
    const ticks = stripTicks(3, 32, "F");
    expect(ticks.map((t) => t.label)).toEqual([40, 50, 60, 70, 80]);
    expect(ticks[0].c).toBeCloseTo(4.444, 2);
  });
  it("keeps 5 °C steps in °C", () => {
    expect(stripTicks(3, 27, "C").map((t) => t.label)).toEqual([5, 10, 15, 20, 25]);
  });
});

describe("thin months", () => {
  it("say the hours read when no whole day was read (not '0d')", () => {
    expect(coverageLabel({ daysObserved: 0, hoursObserved: 24 })).toBe("24 h");
    expect(coverageLabel({ daysObserved: 3, hoursObserved: 80 })).toBe("3 d");
    expect(coverageLabel({ daysObserved: 0, hoursObserved: 0 })).toBe("–");
  });
});

describe("calendar ticks for occasional checks (the water page; Intl, CLDR en-GB)", () => {
  it("puts one tick per month over a few months, never the same month twice ('Jan Jan Feb')", () => {
    const { splits, labels } = calendarTicks(
      at("2025-11-18T00:00:00Z"),
      at("2026-03-02T00:00:00Z"),
      "en-GB",
      "Europe/London",
    );
    expect(labels).toEqual(["Dec 2025", "Jan 2026", "Feb", "Mar"]);
    expect(new Set(labels).size).toBe(labels.length);
    // At local midnight on the 1st in the site's zone.
    expect(splits[0]).toBe(at("2025-12-01T00:00:00Z"));
    expect(
      calendarTicks(at("2026-03-15T00:00:00Z"), at("2026-06-15T00:00:00Z"), "en-GB", "Europe/Madrid").splits[0],
    ).toBe(at("2026-03-31T22:00:00Z"));
  });
  it("thins months over years to at most the ticks asked for, on round months", () => {
    const { labels } = calendarTicks(at("2024-01-10T00:00:00Z"), at("2026-01-10T00:00:00Z"), "en-GB", "UTC", 8);
    expect(labels.length).toBeLessThanOrEqual(8);
    expect(labels).toEqual(["May 2024", "Sept", "Jan 2025", "May", "Sept", "Jan 2026"]);
  });
  it("puts one tick per day over a short range, in the site's locale", () => {
    const { labels } = calendarTicks(at("2026-06-05T09:00:00Z"), at("2026-06-09T18:00:00Z"), "en-GB", "UTC");
    expect(labels).toEqual(["6 Jun", "7 Jun", "8 Jun", "9 Jun"]);
    const us = calendarTicks(at("2026-06-05T09:00:00Z"), at("2026-06-09T18:00:00Z"), "en-US", "UTC").labels;
    expect(us[0]).toBe("Jun 6");
  });
});
