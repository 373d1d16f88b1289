import { describe, expect, it } from "vitest";
import * as SunCalc from "suncalc";
import { seasonProfile } from "~/domain/season/profile";
import { MIN_DAYS_FOR_MONTH, MIN_HOURS_FOR_DAY } from "~/domain/season/thresholds";
import type { Site } from "~/domain/season/types";
import { coldNights } from "~/domain/fit/temperature";
import { DEFAULT_FIT_THRESHOLDS } from "~/domain/fit/facts";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import {
  HOUR,
  hoursBetween,
  localParts,
  london,
  londonYear,
  NIGHTS,
  rollup,
  southern,
  yearOpts,
} from "~/domain/season/profile-fixture";

describe("seasonProfile — synthetic London year", () => {
  const profile = seasonProfile(londonYear(), london, { ...yearOpts, thresholds: [13] });

  it("gives every local month its known lows and highs", () => {
    expect(profile.months.map((m) => m.key)).toEqual(
      ["01", "02", "03", "04", "05", "06", "07", "08", "09", "10", "11", "12"].map((m) => `2025-${m}`),
    );
    profile.months.forEach((m, i) => {
      const n = NIGHTS[i];
      expect(m.temperature.lowest).toBe(n - 1);
      expect(m.temperature.highest).toBe(n + 9);
      expect(m.temperature.meanDailyLow).toBeCloseTo(n - 1, 9);
      expect(m.temperature.meanDailyHigh).toBeCloseTo(n + 9, 9);
      // Half the hours sit at N and half at N + 8, so the hourly 5th/95th percentiles are N and N + 8.
      expect(m.temperature.p05).toBe(n);
      expect(m.temperature.p95).toBe(n + 8);
      expect(m.humidity.mean).toBeCloseTo(40 + (i + 1) * 3, 9);
      expect(m.humidity.lowest).toBe(40 + (i + 1) * 3 - 5);
      expect(m.coverage.enough).toBe(true);
      expect(m.coverage.daysObserved).toBe(m.coverage.daysInPeriod);
    });
  });

  it("counts the 23-hour and 25-hour days of the UK clock changes", () => {
    // UK summer time 2025: clocks forward 30 March, back 26 October (last Sundays; UK law).
    const byKey = new Map(profile.days.map((d) => [d.key, d]));
    expect(byKey.get("2025-03-30")!.hoursObserved).toBe(23);
    expect(byKey.get("2025-10-26")!.hoursObserved).toBe(25);
    expect(byKey.get("2025-07-01")!.hoursObserved).toBe(24);
    expect(profile.days).toHaveLength(365);
  });

  it("counts hours below a threshold by hourly mean, strictly below", () => {
    const jan = profile.months[0];
    const ten = jan.below.find((b) => b.thresholdC === 10)!;
    // January days are exactly 10 °C: not below. 12 night hours × 31 days are.
    expect(ten.hours).toBe(12 * 31);
    expect(ten.nights).toBe(31);
    // March loses its 01:00 night hour on 30 March; October's 01:00 happens twice.
    expect(profile.months[2].below[0].hours).toBe(12 * 31 - 1);
    expect(profile.months[9].below[0].hours).toBe(12 * 31 + 1);
    // May nights are 10 °C (not below) but their minimum 9 °C is: hours 0, nights 31.
    expect(profile.months[4].below[0]).toEqual({ thresholdC: 10, hours: 0, nights: 31 });
    expect(profile.thresholds).toEqual([10, 13]);
  });

  it("groups meteorological seasons of the northern hemisphere and marks partial ones", () => {
    expect(profile.hemisphere).toBe("northern");
    const labels = profile.seasons.map((s) => [s.label, s.months.length, s.coverage.enough]);
    expect(labels).toEqual([
      ["winter 2024–25", 2, false],
      ["spring 2025", 3, true],
      ["summer 2025", 3, true],
      ["autumn 2025", 3, true],
      ["winter 2025–26", 1, false],
    ]);
    const summer = profile.seasons[2];
    expect(summer.key).toBe("2025-06/2025-08");
    expect(summer.temperature.lowest).toBe(12);
    expect(summer.temperature.highest).toBe(24);
  });

  it("builds the year view by month of year", () => {
    expect(profile.year).toHaveLength(12);
    expect(profile.year[6]).toMatchObject({ key: "07", name: "July", monthsIncluded: ["2025-07"] });
    expect(profile.year[6].temperature.lowest).toBe(14);
  });
});

describe("seasonProfile — local months and days", () => {
  it("assigns hours to the local month across a summer-time midnight", () => {
    const p = seasonProfile(
      [
        rollup(Date.parse("2025-03-31T22:00:00Z"), { t: 10 }), // 23:00 BST, 31 March
        rollup(Date.parse("2025-03-31T23:00:00Z"), { t: 10 }), // 00:00 BST, 1 April
        rollup(Date.parse("2025-01-31T23:00:00Z"), { t: 10 }), // 23:00 GMT, 31 January
      ],
      london,
      { from: new Date("2025-01-01T00:00:00Z"), to: new Date("2025-04-30T23:00:00Z") }, // local midnight, 1 May
    );
    expect(p.months.map((m) => [m.key, m.coverage.hoursObserved])).toEqual([
      ["2025-01", 1],
      ["2025-02", 0],
      ["2025-03", 1],
      ["2025-04", 1],
    ]);
    expect(p.days.map((d) => d.key)).toEqual(["2025-01-31", "2025-03-31", "2025-04-01"]);
  });

  it("names southern-hemisphere seasons: December–February is summer", () => {
    const hours = hoursBetween("2024-12-31T13:00:00Z", "2025-12-31T13:00:00Z"); // local 2025 (UTC+11 in summer)
    const rollups = hours.map((ms) => {
      const m = localParts(ms, southern.timeZone).month;
      return rollup(ms, { t: m >= 6 && m <= 8 ? 8 : 22 });
    });
    const p = seasonProfile(rollups, southern, { from: new Date(hours[0]), to: new Date(hours.at(-1)! + HOUR) });
    expect(p.hemisphere).toBe("southern");
    expect(p.months[0].key).toBe("2025-01");
    expect(p.months.at(-1)!.key).toBe("2025-12");
    expect(p.months.every((m) => m.coverage.enough)).toBe(true);
    expect(p.seasons.map((s) => s.label)).toEqual([
      "summer 2024–25",
      "autumn 2025",
      "winter 2025",
      "spring 2025",
      "summer 2025–26",
    ]);
    const winter = p.seasons.find((s) => s.season === "winter")!;
    expect(winter.key).toBe("2025-06/2025-08");
    expect(winter.temperature.highest).toBe(8);
    expect(p.seasons.find((s) => s.label === "summer 2024–25")!.temperature.lowest).toBe(22);
    // 2025-06-30T14:00Z is midnight of 1 July in Sydney (UTC+10 in winter).
    expect(p.days.find((d) => d.key === "2025-07-01")!.hoursObserved).toBe(24);
  });

  it("aggregates all Januaries together in the year view", () => {
    const jan25 = hoursBetween("2025-01-01T00:00:00Z", "2025-02-01T00:00:00Z").map((ms) => rollup(ms, { t: 2 }));
    const jan26 = hoursBetween("2026-01-01T00:00:00Z", "2026-02-01T00:00:00Z").map((ms) => rollup(ms, { t: -1 }));
    const p = seasonProfile([...jan25, ...jan26], london, {
      from: new Date("2025-01-01T00:00:00Z"),
      to: new Date("2026-02-01T00:00:00Z"),
    });
    const jan = p.year[0];
    expect(jan.monthsIncluded).toEqual(["2025-01", "2026-01"]);
    expect(jan.temperature.lowest).toBe(-1);
    expect(jan.temperature.meanDailyLow).toBeCloseTo(0.5, 9);
    expect(jan.coverage.daysObserved).toBe(62);
    expect(p.year[1].coverage.enough).toBe(false); // February: no data at all
  });
});

describe("seasonProfile — coverage", () => {
  // One month of hours, keeping `hoursPerDay` hours on each of the first `days` days.
  function aprilWith(days: number, hoursPerDay: number) {
    const rollups = hoursBetween("2025-03-31T23:00:00Z", "2025-04-30T23:00:00Z")
      .filter((ms) => {
        const p = localParts(ms, london.timeZone);
        return p.day <= days && p.hour < hoursPerDay;
      })
      .map((ms) => rollup(ms, { t: 15 }));
    return seasonProfile(rollups, london, {
      from: new Date("2025-03-31T23:00:00Z"),
      to: new Date("2025-04-30T23:00:00Z"),
    });
  }

  it(`counts a day with ${MIN_HOURS_FOR_DAY} hours as observed, not one with fewer`, () => {
    expect(aprilWith(30, MIN_HOURS_FOR_DAY).months[0].coverage.daysObserved).toBe(30);
    expect(aprilWith(30, MIN_HOURS_FOR_DAY - 1).months[0].coverage.daysObserved).toBe(0);
    // Days under the hour rule still show in the extremes, but not in mean daily lows.
    const thin = aprilWith(30, MIN_HOURS_FOR_DAY - 1).months[0];
    expect(thin.temperature.lowest).toBe(15);
    expect(thin.temperature.meanDailyLow).toBeNull();
  });

  it(`marks a month enough at ${MIN_DAYS_FOR_MONTH} observed days, not at one fewer`, () => {
    expect(aprilWith(MIN_DAYS_FOR_MONTH, 24).months[0].coverage).toMatchObject({
      daysObserved: 20,
      daysInPeriod: 30,
      enough: true,
    });
    expect(aprilWith(MIN_DAYS_FOR_MONTH - 1, 24).months[0].coverage.enough).toBe(false);
  });

  it("marks missing months instead of averaging them", () => {
    const rollups = hoursBetween("2025-01-01T00:00:00Z", "2025-04-11T00:00:00Z").map((ms) => rollup(ms, { t: 12 }));
    const p = seasonProfile(rollups, london, yearOpts);
    expect(p.months.map((m) => m.coverage.enough)).toEqual([true, true, true, ...Array(9).fill(false)]);
    const apr = p.months[3];
    expect(apr.coverage.daysObserved).toBe(10);
    const may = p.months[4];
    expect(may.coverage).toMatchObject({ hoursObserved: 0, daysObserved: 0, daysInPeriod: 31, enough: false });
    expect(may.temperature).toMatchObject({ lowest: null, highest: null, p05: null, meanDailyLow: null });
    expect(p.year[4].coverage.enough).toBe(false);
  });

  it("counts range days of a month that is only partly requested", () => {
    const p = seasonProfile([], london, {
      from: new Date("2025-01-15T00:00:00Z"),
      to: new Date("2025-02-10T00:00:00Z"),
    });
    expect(p.months.map((m) => [m.key, m.coverage.daysInRange, m.coverage.daysInPeriod])).toEqual([
      ["2025-01", 17, 31],
      ["2025-02", 9, 28],
    ]);
  });
});

describe("seasonProfile — day and night", () => {
  // Day hours at 25 °C, night hours at 15 °C, split by sunrise/sunset from suncalc (reference library).
  function sunDay(site: Site, fromUtc: string) {
    const hours = hoursBetween(fromUtc, new Date(Date.parse(fromUtc) + 24 * HOUR).toISOString());
    const times = SunCalc.getTimes(new Date(hours[12]), site.latitude, site.longitude);
    const rollups = hours.map((ms) => {
      const mid = ms + HOUR / 2;
      const up = times.sunrise && times.sunset ? mid >= +times.sunrise && mid < +times.sunset : times.alwaysUp === true;
      return rollup(ms, { t: up ? 25 : 15 });
    });
    return seasonProfile(rollups, site, { from: new Date(hours[0]), to: new Date(hours.at(-1)! + HOUR) });
  }

  it("splits London's midsummer day at sunrise and sunset", () => {
    const p = sunDay(london, "2025-06-20T23:00:00Z");
    const d = p.days[0];
    expect(d.key).toBe("2025-06-21");
    // Published London times for 21 June: sunrise about 04:43, sunset about 21:21 BST (almanac
    // values, memory) → hours starting 05:00 to 20:00 have their midpoints in daylight.
    expect(d.dayHours).toBe(16);
    expect(d.dayNightDifference).toBeCloseTo(10, 9);
    expect(p.months[0].temperature.meanDayNightDifference).toBeCloseTo(10, 9);
  });

  it("splits London's midwinter day", () => {
    // 21 December: sunrise about 08:04, sunset about 15:53 GMT (almanac values, memory) → 08:00–15:00.
    expect(sunDay(london, "2025-12-21T00:00:00Z").days[0].dayHours).toBe(8);
  });

  it("leaves the difference empty in polar night and polar day", () => {
    const tromso: Site = { latitude: 69.65, longitude: 18.96, timeZone: "Europe/Oslo" };
    const winter = sunDay(tromso, "2025-12-20T23:00:00Z").days[0];
    expect(winter).toMatchObject({ dayHours: 0, nightHours: 24, dayNightDifference: null });
    const summer = sunDay(tromso, "2025-06-20T22:00:00Z").days[0];
    expect(summer).toMatchObject({ dayHours: 24, nightHours: 0, dayNightDifference: null });
  });
});

describe("seasonProfile — nights and time near the dew point", () => {
  // A week of 20 °C in a London January, with one cold spell.
  const week = (cold: (local: { day: number; hour: number }) => boolean) =>
    hoursBetween("2025-01-08T00:00:00Z", "2025-01-15T00:00:00Z").map((ms) => {
      const p = localParts(ms, london.timeZone);
      return rollup(ms, { t: cold(p) ? 8 : 20 });
    });

  it("one cold night from 22:00 to 06:00 reads 1 night (a night runs 18:00 to 08:00, common practice)", () => {
    const rollups = week((p) => (p.day === 10 && p.hour >= 22) || (p.day === 11 && p.hour < 6));
    const season = seasonProfile(rollups, london, { ...yearOpts, thresholds: [10] });
    expect(season.months[0].below.find((b) => b.thresholdC === 10)).toMatchObject({ hours: 8, nights: 1 });
    expect(season.nights.filter((n) => n.low < 10).map((n) => n.key)).toEqual(["2025-01-10"]);
    const phal = PLANT_LIBRARY.find((p) => p.name.startsWith("Phalaenopsis"))!;
    const verdict = coldNights(phal, season, DEFAULT_FIT_THRESHOLDS);
    // 8 °C is under Phalaenopsis' 10 °C damage line: one night, named by the date it starts.
    expect(verdict.facts[0]).toMatchObject({
      kind: "cold-damage",
      nights: 1,
      worst: [{ date: "2025-01-10", valueC: 8, hours: 8 }],
    });
  });

  it("two cold evenings are two nights, and a cold morning belongs to the night before", () => {
    const rollups = week(
      (p) => (p.day === 9 && p.hour === 23) || (p.day === 12 && p.hour === 5) || (p.day === 12 && p.hour === 19),
    );
    const season = seasonProfile(rollups, london, { ...yearOpts, thresholds: [10] });
    expect(season.nights.filter((n) => n.low < 10).map((n) => n.key)).toEqual([
      "2025-01-09",
      "2025-01-11",
      "2025-01-12",
    ]);
    expect(season.months[0].below.find((b) => b.thresholdC === 10)!.nights).toBe(3);
  });

  it("a January on a single-glazed sill: 91 hours touch the 2 °C margin but the readings spend 71 h under it", () => {
    // 744 hours of six readings each; in 51 hours all six are under the margin, in 40 only three.
    const rollups = hoursBetween("2025-01-01T00:00:00Z", "2025-02-01T00:00:00Z").map((ms, i) => {
      const r = rollup(ms, { t: 6, rh: 80, dp: i < 91 ? 1.2 : 4 });
      return { ...r, dpN: 6, dpUnderN: i < 51 ? 6 : i < 91 ? 3 : 0 };
    });
    expect(rollups.filter((r) => r.dpMarginMin! < 2).length).toBe(91);
    expect(seasonProfile(rollups, london, yearOpts).months[0].condensationHours).toBe(71);
  });
});
