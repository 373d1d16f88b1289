import { describe, expect, it } from "vitest";
import { compareHeadlines, seasonsOfYear, type CompareMonth } from "~/domain/season/compare";

// Meteorological seasons (Dec–Feb winter in the north; WMO/Met Office convention), flipped in the south.
const month = (m: number, low: number, high: number, enough = true): CompareMonth => ({
  month: m,
  temperature: { lowest: low - 2, highest: high + 2, meanDailyLow: low, meanDailyHigh: high, meanDayNightDifference: high - low },
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
    expect(north[0]).toMatchObject({ season: "winter", monthsCovered: 3, meanDailyLow: 4, lowest: 2, highest: 10, hoursBelow10: 300, condensationHours: 15 });
    const south = seasonsOfYear(y, "southern");
    expect(south.find((s) => s.season === "winter")).toMatchObject({ meanDailyLow: 14, meanDailyHigh: 24 });
  });

  it("leaves out months without enough readings", () => {
    const y = year((m) => [m, m + 10], (m) => m !== 1);
    const winter = seasonsOfYear(y, "northern")[0];
    expect(winter.monthsCovered).toBe(2);
    expect(winter.meanDailyLow).toBe(7); // (12 + 2) / 2
  });
});

describe("compareHeadlines", () => {
  it("names the warmest spot in winter by its nights and the coolest in summer by its days", () => {
    const shelf = { name: "Bathroom shelf", seasons: seasonsOfYear(year((m) => (m === 12 || m <= 2 ? [15, 20] : [17, 23])), "northern") };
    const sill = { name: "East sill", seasons: seasonsOfYear(year((m) => (m === 12 || m <= 2 ? [9, 17] : [13, 21])), "northern") };
    const h = compareHeadlines([shelf, sill]);
    expect(h.find((x) => x.season === "winter" && x.kind === "warmest")).toMatchObject({ spot: "Bathroom shelf", figure: 15 });
    expect(h.find((x) => x.season === "summer" && x.kind === "coolest")).toMatchObject({ spot: "East sill", figure: 21 });
    expect(h).toHaveLength(2); // with two spots the coldest and hottest are just the other one
  });

  it("adds the coldest in winter and the hottest in summer for three spots", () => {
    const mk = (name: string, low: number, high: number) => ({ name, seasons: seasonsOfYear(year(() => [low, high]), "northern") });
    const h = compareHeadlines([mk("A", 10, 20), mk("B", 14, 24), mk("C", 6, 26)]);
    expect(h.map((x) => `${x.season} ${x.kind} ${x.spot}`)).toEqual(["winter warmest B", "winter coldest C", "summer coolest A", "summer hottest C"]);
  });

  it("skips a season a spot has too few months of", () => {
    const a = { name: "A", seasons: seasonsOfYear(year(() => [10, 20], (m) => m > 2 && m < 12), "northern") };
    const b = { name: "B", seasons: seasonsOfYear(year(() => [12, 22]), "northern") };
    expect(compareHeadlines([a, b]).some((x) => x.season === "winter")).toBe(false);
  });
});
