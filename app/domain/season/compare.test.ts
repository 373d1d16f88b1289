import { describe, expect, it } from "vitest";
import {
  compareHeadlines,
  describeHeadline,
  SAME_WITHIN_C,
  seasonsOfYear,
  SENSOR_ACCURACY_C,
  type CompareMonth,
} from "~/domain/season/compare";

// Meteorological seasons (Dec–Feb winter in the north; WMO/Met Office convention), flipped in the south.
const month = (m: number, low: number, high: number, enough = true): CompareMonth => ({
  month: m,
  temperature: {
    lowest: low - 2,
    highest: high + 2,
    meanDailyLow: low,
    meanDailyHigh: high,
    meanDayNightDifference: high - low,
  },
  humidity: { mean: 60 },
  below: [{ thresholdC: 10, hours: low < 10 ? 100 : 0 }],
  condensationHours: 5,
  coverage: { enough },
});
const year = (f: (m: number) => [number, number], enough = (_m: number) => true) =>
  Array.from({ length: 12 }, (_, i) => month(i + 1, ...f(i + 1), enough(i + 1)));

describe("seasonsOfYear", () => {
  it("takes winter as December–February in the north and June–August in the south", () => {
    const y = year((m) => (m === 12 || m <= 2 ? [4, 8] : m >= 6 && m <= 8 ? [14, 24] : [9, 16]));
    const north = seasonsOfYear(y, "northern");
    expect(north[0]).toMatchObject({
      season: "winter",
      monthsCovered: 3,
      meanDailyLow: 4,
      lowest: 2,
      highest: 10,
      hoursBelow10: 300,
      condensationHours: 15,
    });
    const south = seasonsOfYear(y, "southern");
    expect(south.find((s) => s.season === "winter")).toMatchObject({ meanDailyLow: 14, meanDailyHigh: 24 });
  });

  it("leaves out months without enough readings", () => {
    const y = year(
      (m) => [m, m + 10],
      (m) => m !== 1,
    );
    const winter = seasonsOfYear(y, "northern")[0];
    expect(winter.monthsCovered).toBe(2);
    expect(winter.meanDailyLow).toBe(7); // (12 + 2) / 2
  });
});

describe("compareHeadlines", () => {
  it("names the warmest spot in winter by its nights and the coolest in summer by its days", () => {
    const shelf = {
      name: "Bathroom shelf",
      seasons: seasonsOfYear(
        year((m) => (m === 12 || m <= 2 ? [15, 20] : [17, 23])),
        "northern",
      ),
    };
    const sill = {
      name: "East sill",
      seasons: seasonsOfYear(
        year((m) => (m === 12 || m <= 2 ? [9, 17] : [13, 21])),
        "northern",
      ),
    };
    const h = compareHeadlines([shelf, sill]);
    expect(h.find((x) => x.season === "winter" && x.kind === "warmest")).toMatchObject({
      spot: "Bathroom shelf",
      figure: 15,
    });
    expect(h.find((x) => x.season === "summer" && x.kind === "coolest")).toMatchObject({
      spot: "East sill",
      figure: 21,
    });
    expect(h).toHaveLength(2); // with two spots the coldest and hottest are just the other one
  });

  it("adds the coldest in winter and the hottest in summer for three spots", () => {
    const mk = (name: string, low: number, high: number) => ({
      name,
      seasons: seasonsOfYear(
        year(() => [low, high]),
        "northern",
      ),
    });
    const h = compareHeadlines([mk("A", 10, 20), mk("B", 14, 24), mk("C", 6, 26)]);
    expect(h.map((x) => `${x.season} ${x.kind} ${x.spot}`)).toEqual([
      "winter warmest B",
      "winter coldest C",
      "summer coolest A",
      "summer hottest C",
    ]);
  });

  it("skips a season a spot has too few months of", () => {
    const a = {
      name: "A",
      seasons: seasonsOfYear(
        year(
          () => [10, 20],
          (m) => m > 2 && m < 12,
        ),
        "northern",
      ),
    };
    const b = {
      name: "B",
      seasons: seasonsOfYear(
        year(() => [12, 22]),
        "northern",
      ),
    };
    expect(compareHeadlines([a, b]).some((x) => x.season === "winter")).toBe(false);
  });
});

// Sensor accuracy ±0.5 °C per sensor (common practice for cheap hobby sensors, e.g. the DHT22 and
// SHT3x data sheets): two spots, two sensors, so up to 1 °C apart is no evidence of a difference.
describe("spots closer than the sensors can tell apart", () => {
  const c = (v: number) => `${v.toFixed(1)} °C`;
  const mk = (name: string, low: number, high: number) => ({
    name,
    seasons: seasonsOfYear(
      year(() => [low, high]),
      "northern",
    ),
  });

  it("names no winner when two spots differ by 0.003 °C, and says they are about the same within sensor accuracy", () => {
    expect(SENSOR_ACCURACY_C).toBe(0.5);
    const h = compareHeadlines([mk("Bench A", 12.001, 22), mk("Bench B", 12.004, 22.002)]);
    const winter = h.filter((x) => x.season === "winter");
    expect(winter).toHaveLength(1);
    expect(winter[0]).toMatchObject({ allSame: true });
    const words = describeHeadline(winter[0], c, c);
    expect(words).not.toMatch(/is the warmest/);
    expect(words).toMatch(
      /^Bench B and Bench A are about the same in winter \(nights average 12\.0 °C and 12\.0 °C\): the difference is within what two sensors of ±0\.5 °C each can tell apart\.$/,
    );
  });

  it("still names the winner once the gap is beyond what two sensors can tell apart", () => {
    const h = compareHeadlines([mk("Shelf", 12 + SAME_WITHIN_C + 0.1, 22), mk("Sill", 12, 22)]);
    const winter = h.find((x) => x.season === "winter")!;
    expect(winter.sameAs).toEqual([]);
    expect(describeHeadline(winter, c, c)).toBe("Shelf is the warmest in winter (nights average 13.1 °C).");
  });

  it("with three spots names the two that are level together and keeps the clearly colder one apart", () => {
    const h = compareHeadlines([mk("A", 10, 20), mk("B", 10.3, 24), mk("C", 6, 26)]);
    const warmest = h.find((x) => x.season === "winter" && x.kind === "warmest")!;
    expect(warmest).toMatchObject({ spot: "B", sameAs: [{ spot: "A", figure: 10 }], allSame: false });
    expect(describeHeadline(warmest, c, c)).toMatch(/^B and A are the warmest in winter, about the same as each other/);
    expect(h.find((x) => x.season === "winter" && x.kind === "coldest")).toMatchObject({ spot: "C", sameAs: [] });
  });
});
