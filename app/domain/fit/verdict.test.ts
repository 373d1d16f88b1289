import { describe, expect, it } from "vitest";
import { coldSnaps, spotYear, steadyRoom } from "~/domain/fit/season-fixture";
import { describeReason } from "~/domain/fit/describe";
import { VERDICT_ORDER, VERDICT_RULES, fitPlant, rankPlantsForSpot, rankSpotsForPlant } from "~/domain/fit/verdict";
import { PLANT_LIBRARY, plantByKey } from "~/domain/plants/library";
import { MIN_DAYS_FOR_MONTH } from "~/domain/season/thresholds";

const phal = plantByKey("phalaenopsis")!;
const cymbidium = plantByKey("cymbidium")!;
// 18/24 °C, 60 %, with a light sensor reading a bright shaded window (Phalaenopsis' band): a steady heated room
const lit = (m: number) => ({ ...steadyRoom(m), lux: 7000 });
const room = spotYear({ month: lit });

// An invented unheated porch: cold winters, mild summers.
const NIGHT = [4, 5, 7, 9, 12, 14, 16, 16, 13, 10, 6, 4];
const DAY = [9, 10, 13, 16, 20, 23, 25, 25, 21, 16, 12, 9];
const porch = spotYear({ month: (m) => ({ night: NIGHT[m - 1], day: DAY[m - 1], rh: 65 }) });

describe("fitPlant", () => {
  it("says a plant thrives when a full year passes every rule", () => {
    const fit = fitPlant(phal, room);
    expect(fit).toMatchObject({
      plantKey: "phalaenopsis",
      verdict: "thrives here",
      missingMonths: [],
      missingAdvice: null,
    });
    expect(fit.level).toBe("good");
    expect(fit.reasons.map((r) => r.rule).sort()).toEqual([
      "cold-nights",
      "condensation",
      "flowering",
      "hot-days",
      "humidity",
      "light",
    ]);
  });

  it("never says thrives with light unknown (issue 15): it says what is known and what is not", () => {
    const fit = fitPlant(phal, spotYear());
    expect(fit.verdict).toBe("possible with care");
    expect(fit.reasons.find((r) => r.rule === "light")).toMatchObject({ level: "unknown", noData: true });
  });

  it("says possible with care when a rule asks for care", () => {
    // Grows in a warm bright room, but no cool spell to flower.
    const fit = fitPlant(cymbidium, spotYear({ month: (m) => ({ ...steadyRoom(m), rh: 55, lux: 25000 }) }));
    expect(fit.verdict).toBe("possible with care");
    expect(fit.reasons[0]).toMatchObject({ rule: "flowering", level: "care" }); // most serious first
  });

  it("says struggles here when a rule is poor", () => {
    const fit = fitPlant(phal, porch);
    expect(fit.verdict).toBe("struggles here");
    expect(fit.reasons[0]).toMatchObject({ rule: "cold-nights", level: "poor" });
    expect(describeReason(fit.reasons[0])).toMatch(/^Cold past the damage line: \d+ nights under 10 °C/);
  });

  it("holds back with months missing, and names them in the order they come round", () => {
    const fit = fitPlant(phal, spotYear({ observed: [4, 5, 6, 7, 8, 9] }));
    expect(fit.verdict).toBe("not enough data yet");
    expect(fit.missingMonths).toEqual(["October", "November", "December", "January", "February", "March"]);
    expect(fit.missingAdvice).toBe(
      "Still missing October, November, December, January, February and March: leave the sensor where it is through March.",
    );
  });

  it("still says struggles when what was measured already rules it out", () => {
    const fit = fitPlant(phal, spotYear({ observed: [1, 2, 3], month: (m) => ({ ...steadyRoom(m), night: 8 }) }));
    expect(fit.verdict).toBe("struggles here");
    expect(fit.missingMonths).toHaveLength(9);
  });

  it(`needs ${MIN_DAYS_FOR_MONTH} observed days in a month before a verdict`, () => {
    const keep = (days: number) => (m: number, d: number) => m !== 2 || d <= days;
    expect(fitPlant(phal, spotYear({ month: lit, keepDay: keep(MIN_DAYS_FOR_MONTH) })).verdict).toBe("thrives here");
    const short = fitPlant(phal, spotYear({ month: lit, keepDay: keep(MIN_DAYS_FOR_MONTH - 1) }));
    expect(short.verdict).toBe("not enough data yet");
    expect(short.missingMonths).toEqual(["February"]);
    expect(short.missingAdvice).toBe("Still missing February: leave the sensor where it is through February.");
  });

  it("asks for a whole year when nothing is measured", () => {
    const fit = fitPlant(phal, spotYear({ observed: [] }));
    expect(fit.verdict).toBe("not enough data yet");
    expect(fit.missingMonths).toHaveLength(12);
    expect(fit.missingAdvice).toMatch(/whole year/);
  });

  it("publishes its rule table in the order it applies", () => {
    expect(VERDICT_RULES.map((r) => r.verdict)).toEqual([
      "struggles here",
      "good for part of the year",
      "not enough data yet",
      "possible with care",
      "thrives here",
    ]);
    for (const r of VERDICT_RULES) expect(r.when.length).toBeGreaterThan(20);
  });
});

describe("ranking", () => {
  it("ranks plants for a spot best first", () => {
    const ranked = rankPlantsForSpot(PLANT_LIBRARY, room);
    expect(ranked).toHaveLength(PLANT_LIBRARY.length);
    const order = ranked.map((r) => VERDICT_ORDER.indexOf(r.fit.verdict));
    expect([...order].sort((a, b) => a - b)).toEqual(order);
    const keys = ranked.map((r) => r.plant.key);
    expect(keys.indexOf("phalaenopsis")).toBeLessThan(keys.indexOf("cymbidium"));
    expect(ranked[0].fit.verdict).toBe("thrives here");
  });

  it("on a frosty spot where every group struggles, ranks by degree-hours past damage: hardiest first, warm growers last", () => {
    // Winter nights of −4 °C and summer days of 24 °C: past every damage line but Pleione's −3 °C… almost.
    const frosty = spotYear({ month: (m) => ({ ...steadyRoom(m), night: m <= 2 || m === 12 ? -4 : 10, day: 24 }) });
    const ranked = rankPlantsForSpot(PLANT_LIBRARY, frosty).filter((r) => r.fit.verdict === "struggles here");
    expect(ranked.length).toBeGreaterThan(10);
    const damage = ranked.map((r) => r.fit.miss.damage);
    expect([...damage].sort((a, b) => a - b)).toEqual(damage);
    expect(ranked[0].plant.key).toBe("pleione");
    expect(ranked.at(-1)!.plant.key).toBe("nepenthes-lowland"); // damaged under 13 °C
  });

  it("among groups asking for care, puts what a humidity tray fixes before a window too dark to flower them", () => {
    // A north window with a dry winter: Phalaenopsis only needs a tray; Brassavola needs sun it won't get.
    const north = { latitude: 51.5, facing: "N" as const, indoor: true };
    const season = spotYear({
      month: (m) => ({ ...steadyRoom(m), night: 19, day: 24, ...(m <= 2 ? { rhDay: 40, rhNight: 60 } : {}) }),
    });
    const keys = rankPlantsForSpot([plantByKey("brassavola")!, phal], season, undefined, north).map((r) => r.plant.key);
    expect(keys).toEqual(["phalaenopsis", "brassavola"]);
  });

  it("ranks spots for a plant best first, keeping the caller's spot objects", () => {
    const spots = [
      { id: "porch", season: porch },
      { id: "bathroom-shelf", season: spotYear({ month: lit, patches: coldSnaps(1, 2, 14.5) }) },
      { id: "spare-room", season: room },
    ];
    expect(rankSpotsForPlant(phal, spots).map((r) => [r.spot.id, r.fit.verdict])).toEqual([
      ["spare-room", "thrives here"],
      ["bathroom-shelf", "possible with care"],
      ["porch", "struggles here"],
    ]);
  });

  it("prefers the spot whose cool autumn lets Cymbidium flower", () => {
    const ranked = rankSpotsForPlant(cymbidium, [
      { id: "heated", season: spotYear({ month: (m) => ({ ...steadyRoom(m), rh: 55, lux: 25000 }) }) },
      {
        id: "cool-landing",
        season: spotYear({
          month: (m) => ({ ...steadyRoom(m), night: m >= 9 && m <= 11 ? 11 : 16, rh: 55, lux: 25000 }),
        }),
      },
    ]);
    expect(ranked.map((r) => [r.spot.id, r.fit.verdict])).toEqual([
      ["cool-landing", "thrives here"],
      ["heated", "possible with care"],
    ]);
  });
});
