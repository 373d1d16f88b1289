import { describe, it, expect } from "vitest";
import * as SunCalc from "suncalc";
import {
  FACING_AZIMUTH,
  directSunMonths,
  noonElevation,
  noonElevationByMonth,
  sunTimes,
  type DirectSunMonth,
} from "~/domain/climate/sun";
import type { WindowFacing } from "~/domain/vocabulary";

// Reference library: suncalc 2.0.2 (degrees; altitude corrected for refraction).

function month(months: DirectSunMonth[] | null, m: number): DirectSunMonth {
  if (months === null) throw new Error("expected months");
  return months[m - 1];
}

describe("sunTimes", () => {
  it("matches suncalc for a mid-latitude day", () => {
    const date = new Date(Date.UTC(2025, 5, 20, 12));
    const ours = sunTimes(51.5, -0.1, date);
    const ref = SunCalc.getTimes(date, 51.5, -0.1);
    expect(ours.polar).toBeNull();
    expect(ours.sunrise?.getTime()).toBe(ref.sunrise?.getTime());
    expect(ours.sunset?.getTime()).toBe(ref.sunset?.getTime());
    // London midsummer: sunrise about 03:43 UTC, sunset about 20:21 UTC (almanac values, memory).
    expect(ours.sunrise!.getUTCHours()).toBe(3);
    expect(ours.sunset!.getUTCHours()).toBe(20);
  });

  it("reports polar day and polar night instead of invalid times", () => {
    const summer = sunTimes(78.2, 15.6, new Date(Date.UTC(2025, 5, 21)));
    expect(summer).toEqual({ sunrise: null, sunset: null, polar: "day" });
    const winter = sunTimes(78.2, 15.6, new Date(Date.UTC(2025, 11, 21)));
    expect(winter).toEqual({ sunrise: null, sunset: null, polar: "night" });
  });
});

describe("noonElevation", () => {
  // The sun stands overhead (90°) at noon on the Tropic of Cancer at the June solstice, on the
  // Tropic of Capricorn at the December solstice, and on the equator at an equinox: solstice
  // declinations ±23.44° (the obliquity of the ecliptic); 2025's solstices 21 June and
  // 21 December, its March equinox 20 March 09:01 UTC (almanac, memory). Declination moves 0.4° a
  // day near an equinox, so three hours after it the noon sun is still within 0.1° of overhead.
  it("is overhead on the tropics at the solstices and on the equator at the equinox", () => {
    expect(Math.abs(noonElevation(23.44, new Date(Date.UTC(2025, 5, 21))) - 90)).toBeLessThan(0.1);
    expect(Math.abs(noonElevation(-23.44, new Date(Date.UTC(2025, 11, 21))) - 90)).toBeLessThan(0.1);
    expect(Math.abs(noonElevation(0, new Date(Date.UTC(2025, 2, 20))) - 90)).toBeLessThan(0.1);
  });

  // shared/REFERENCES.md (computed, 90 − |φ − δ|): 51.5° N on 20 June → 61.95°, 40° N → 73.45°.
  // Tolerance 0.1°; suncalc's refraction adds under 0.01° this high.
  it("matches the reference values for 20 June", () => {
    const june20 = new Date(Date.UTC(2025, 5, 20));
    expect(Math.abs(noonElevation(51.5, june20) - 61.95)).toBeLessThan(0.1);
    expect(Math.abs(noonElevation(40, june20) - 73.45)).toBeLessThan(0.1);
  });

  it("is below the horizon in polar night", () => {
    expect(noonElevation(78.2, new Date(Date.UTC(2025, 11, 21)))).toBeLessThan(0);
  });
});

describe("noonElevationByMonth", () => {
  it("takes the 21st of each month and peaks in June in the north, December in the south", () => {
    const north = noonElevationByMonth(50);
    expect(north.map((m) => m.month)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(north.every((m) => m.date.getUTCDate() === 21)).toBe(true);
    const highest = (rows: typeof north) => rows.reduce((a, b) => (b.elevation > a.elevation ? b : a)).month;
    expect(highest(north)).toBe(6);
    expect(highest(noonElevationByMonth(-35))).toBe(12);
    // 50° N, December solstice: 90 − 50 − 23.44 = 16.56° (computed), plus suncalc's refraction,
    // about 0.05° at that height (Meeus 16.4).
    expect(Math.abs(north[11].elevation - 16.56 - 0.05)).toBeLessThan(0.05);
  });
});

// Plausibility of the sun-path geometry, computed by hand from 90 − |φ − δ| and the fact that at
// mid-northern latitudes the sun rises north of east only between the March and September
// equinoxes. Each expectation is stated so that it follows from geometry, not from our code.
describe("directSunMonths", () => {
  it("south window at 50° N: deeper and more face-on sun in December than June", () => {
    const { months } = directSunMonths(50, "S");
    const dec = month(months, 12);
    const jun = month(months, 6);
    expect(dec.depthPerMetre!).toBeGreaterThan(3 * jun.depthPerMetre!);
    expect(dec.faceOnHours).toBeGreaterThan(jun.faceOnHours);
    // Noon depth in December is 1 / tan 16.6° ≈ 3.4 m per metre of window height (computed).
    expect(dec.depthPerMetre!).toBeGreaterThan(3);
    expect(jun.depthPerMetre!).toBeLessThan(0.6);
    // In raw hours June wins: the sun stands in front of a south window from about 07:20 to 16:40
    // solar time (it crosses due east and due west at ~31° up), against about 6–7 h above 5° in
    // December. The strong winter sun is in faceOnHours and depth, not in the hour count.
    expect(jun.hours).toBeGreaterThan(8.5);
    expect(dec.hours).toBeGreaterThan(5.5);
    expect(dec.hours).toBeLessThan(7.5);
  });

  it("north window at 50° N: no direct sun from October to February, some low sun around June", () => {
    const { months } = directSunMonths(50, "N");
    for (const m of [10, 11, 12, 1, 2]) expect(month(months, m).hours, `month ${m}`).toBe(0);
    const jun = month(months, 6);
    expect(jun.getsDirectSun).toBe(true);
    expect(jun.faceOnHours).toBeLessThan(1);
    expect(jun.morningHours).toBeCloseTo(jun.afternoonHours, 0);
  });

  it("mirrors at 35° S: the north window is the sunny one, deepest in June", () => {
    const north = directSunMonths(-35, "N").months;
    expect(month(north, 6).depthPerMetre!).toBeGreaterThan(3 * month(north, 12).depthPerMetre!);
    expect(month(north, 6).faceOnHours).toBeGreaterThan(month(north, 12).faceOnHours);
    const south = directSunMonths(-35, "S").months;
    for (const m of [4, 5, 6, 7, 8]) expect(month(south, m).hours, `month ${m}`).toBe(0);
    expect(month(south, 12).getsDirectSun).toBe(true);
  });

  it("east and west windows get morning and afternoon sun in every month", () => {
    for (const lat of [50, -35]) {
      const east = directSunMonths(lat, "E").months!;
      const west = directSunMonths(lat, "W").months!;
      for (let m = 0; m < 12; m++) {
        expect(east[m].hours).toBeGreaterThan(2);
        expect(east[m].afternoonHours).toBe(0);
        expect(west[m].hours).toBeGreaterThan(2);
        expect(west[m].morningHours).toBe(0);
      }
    }
  });

  it("mirrors east and west exactly (within one quarter-hour sample)", () => {
    const east = directSunMonths(50, "E").months!;
    const west = directSunMonths(50, "W").months!;
    for (let m = 0; m < 12; m++) expect(Math.abs(east[m].hours - west[m].hours)).toBeLessThanOrEqual(0.25);
  });

  it("gives no sun anywhere in polar night", () => {
    for (const facing of Object.keys(FACING_AZIMUTH) as WindowFacing[]) {
      expect(month(directSunMonths(75, facing).months, 12).hours).toBe(0);
    }
  });

  it("makes no estimate for a spot that is not behind a window", () => {
    const estimate = directSunMonths(50, "none");
    expect(estimate.months).toBeNull();
    expect(estimate.explanation).toMatch(/no direct-sun estimate/);
  });

  it("explains itself in plain words, with its assumptions", () => {
    const { explanation } = directSunMonths(50, "S");
    expect(explanation).toMatch(/open horizon/);
    expect(explanation).toMatch(/21 December/);
    expect(explanation).toMatch(/21 June/);
    expect(explanation).toMatch(/per metre of window height/);
    expect(directSunMonths(-35, "N").explanation).toMatch(/faces the side of the sky the sun crosses at midday/);
    expect(directSunMonths(50, "N").explanation).toMatch(/No direct sun to speak of in: January/);
  });
});
