import { describe, expect, it } from "vitest";
import type { ForecastNight } from "~/domain/projection/forecast";
import { forecastDetail, forecastHeadline, likelyLow, mostTender, nightName, planForecast } from "./forecast-warning";

const HOUR = 3_600_000;
const NOW = Date.UTC(2026, 11, 1, 18, 0); // Tuesday 1 Dec 2026, 18:00 UTC
const night = (
  key: string,
  hoursAhead: number,
  expectedLow: number,
  lowerBound: number,
  leafLow: number | null = null,
): ForecastNight => ({
  key,
  at: new Date(NOW + hoursAhead * HOUR),
  expectedLow,
  lowerBound,
  leafLow,
  clearStill: leafLow !== null,
});
// Cymbidium: damage line 2 °C (library.ts LIMITS, AOS sheet, memory).
const cymbidium = { name: "Cymbidium", damageC: 2 };

describe("planForecast", () => {
  it("warns of a night 12–48 h ahead whose lower bound or leaf low reaches the damage line, not one nearer or farther", () => {
    const plan = planForecast({
      now: NOW,
      tender: cymbidium,
      open: [],
      nights: [
        night("2026-12-01", 10, 0, -1),
        night("2026-12-02", 34, 4, 2.5, 1.5),
        night("2026-12-03", 58, -2, -3),
        night("2026-12-04", 30, 5, 3),
      ],
    });
    expect(plan.warn.map((n) => n.key)).toEqual(["2026-12-02"]);
    expect(plan.warn[0].likely).toBe(1.5);
  });

  it("keeps a warned night that still crosses or hovers within the margin, and clears it only once it is clearly above", () => {
    const open = [{ night: "2026-12-02" }];
    expect(
      planForecast({ now: NOW, tender: cymbidium, open, nights: [night("2026-12-02", 30, 4, 2.3)] }),
    ).toMatchObject({ warn: [], clear: [], keep: [{ key: "2026-12-02" }] });
    expect(
      planForecast({ now: NOW, tender: cymbidium, open, nights: [night("2026-12-02", 30, 5, 2.6)] }),
    ).toMatchObject({ warn: [], clear: ["2026-12-02"] });
  });

  it("warns of nothing without a placed plant", () => {
    expect(planForecast({ now: NOW, tender: null, open: [], nights: [night("2026-12-02", 30, -5, -6)] }).warn).toEqual(
      [],
    );
  });
});

describe("words", () => {
  it("picks the plant with the highest damage line", () => {
    expect(mostTender([{ name: "Pleione", damageC: -3 }, cymbidium, { name: "Coelogyne", damageC: 1 }])).toEqual(
      cymbidium,
    );
  });

  it("names the night by its local start date and gives the figure in the grower's unit", () => {
    expect(nightName("2026-12-03")).toBe("Thursday night (3 Dec)");
    const base = {
      night: "2026-12-03",
      spotName: "the bench",
      plantName: "Cymbidium",
      damageC: 2,
      lowAt: new Date(Date.UTC(2026, 11, 4, 5)),
    };
    const cold = { ...base, likelyC: -0.5, expectedLowC: 1, lowerBoundC: -0.5, leafLowC: null };
    expect(forecastHeadline(cold, "C")).toBe(
      "Thursday night (3 Dec): 1.0 °C expected on the bench; the Cymbidium's limit is 2.0 °C — bring it in.",
    );
    expect(forecastHeadline(cold, "F")).toBe(
      "Thursday night (3 Dec): 33.8 °F expected on the bench; the Cymbidium's limit is 35.6 °F — bring it in.",
    );
    const w = { ...base, likelyC: 1, expectedLowC: 3, lowerBoundC: 1.4, leafLowC: 1 };
    expect(forecastHeadline(w, "C")).toBe(
      "Thursday night (3 Dec): 1.0 °C expected on the leaves at the " +
        "bench under a clear, still sky (air 3.0 °C); the Cymbidium's " +
        "limit is 2.0 °C — bring it in.",
    );
    // Only the 80 % lower bound crosses: said as a possibility, not as the expectation.
    const loose = { ...base, likelyC: 1.4, expectedLowC: 3.4, lowerBoundC: 1.4, leafLowC: null };
    expect(forecastHeadline(loose, "C")).toBe(
      "Thursday night (3 Dec): 3.4 °C expected on the bench, and 1.4 °C quite possible; the Cymbidium's limit is 2.0 °C — bring it in.",
    );
    expect(forecastDetail(w, "F", "Europe/London")).toContain("about 3.6 °F below the air");
    expect(likelyLow({ lowerBound: 1.4, leafLow: 1 })).toBe(1);
    expect(likelyLow({ lowerBound: 1.4, leafLow: null })).toBe(1.4);
  });
});
