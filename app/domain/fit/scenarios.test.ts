// Spot scenarios of temperature and flowering (light and air: scenarios-light-air.test.ts), and how
// the fit ranks plants for a spot and says when an outdoor bench suits a group.
import { describe, expect, it } from "vitest";
import { describeReason, describeSeasonal } from "~/domain/fit/describe";
import {
  bench,
  byMonth,
  dip,
  east,
  judgeScenarios,
  rule,
  steady,
  summer,
  type Scenario,
} from "~/domain/fit/scenario-kit";
import { spotYear } from "~/domain/fit/season-fixture";
import { fitPlant, rankPlantsForSpot } from "~/domain/fit/verdict";
import { PLANT_LIBRARY, plantByKey } from "~/domain/plants/library";

const SCENARIOS: Scenario[] = [
  {
    name: "constant warm room 20/23 °C, no light sensor: Phalaenopsis spikes, light unknown",
    season: () => spotYear({ month: steady(20, 23) }),
    plant: "phalaenopsis",
    verdict: "possible with care",
    source:
      "Blanchard & Runkle (2006): constant 20 and 23 °C both spiked; light unknown never gets the top verdict (issue 15)",
    check: (r) => {
      expect(rule(r, "flowering").level).toBe("good");
      expect(rule(r, "light").level).toBe("unknown");
    },
  },
  {
    name: "constant warm room with measured light in band: Phalaenopsis thrives",
    season: () => spotYear({ month: steady(20, 23, { lux: 7000 }) }),
    plant: "phalaenopsis",
    verdict: "thrives here",
    source: "AOS Phalaenopsis culture sheet (nights above 16 °C, days 24–29 °C, bright shade)",
  },
  {
    name: "one brief dip: one hour at 13.9 °C on 17 January in a warm room",
    season: () => spotYear({ month: steady(19, 23, { lux: 7000 }), patches: [dip(1, 17, 23, 13.9)] }),
    plant: "phalaenopsis",
    verdict: "possible with care",
    source: "common practice: one cool night above the ~10 °C chilling line (Reid 1991) does no harm",
    check: (r) => {
      const cold = rule(r, "cold-nights");
      expect(cold.level).toBe("care");
      expect(cold.facts[0]).toMatchObject({
        kind: "cold-snap",
        nights: 1,
        worst: [{ date: "2025-01-17", valueC: 13.9, hours: 1 }],
      });
      expect(describeReason(cold)).toContain("17 Jan: 13.9 °C for 1 hour");
    },
  },
  {
    name: "one 4.9 °C night on a Cymbidium bench",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: m >= 8 && m <= 11 ? 11 : summer(m) ? 14 : 9,
          day: summer(m) ? 24 : 18,
          lux: 25000,
        })),
        patches: [dip(1, 10, 23, 4.9)],
      }),
    plant: "cymbidium",
    verdict: "possible with care",
    source: "AOS Cymbidium culture sheet: takes nights near 2–4 °C without frost",
    check: (r) => expect(rule(r, "cold-nights").facts[0]).toMatchObject({ kind: "cold-snap" }),
  },
  {
    name: "cool autumn bench: Cymbidium gets its spiking nights in August–November",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: m >= 8 && m <= 11 ? 11 : summer(m) ? 14 : 9,
          day: m >= 8 && m <= 11 ? 22 : 20,
          rh: 55,
          lux: 25000,
        })),
      }),
    plant: "cymbidium",
    verdict: "thrives here",
    source: "AOS Cymbidium culture sheet: late-summer to autumn nights 10–16 °C initiate spikes",
    check: (r) => expect(rule(r, "flowering").facts[0]).toMatchObject({ kind: "cue-met" }),
  },
  {
    name: "Cymbidium with cool nights only in December–February: the cue comes too late",
    season: () =>
      spotYear({ month: byMonth((m) => ({ night: m === 12 || m <= 2 ? 10 : 16, day: 22, rh: 55, lux: 25000 })) }),
    plant: "cymbidium",
    verdict: "possible with care",
    source: "REFERENCES.md (common practice, society culture sheets): spikes initiate in late summer and autumn",
    check: (r) => {
      const fl = rule(r, "flowering");
      expect(fl.facts[0], JSON.stringify(fl.facts[0])).toMatchObject({ kind: "cue-missed", outOfSeason: [12, 1, 2] });
      expect(describeReason(fl)).toContain("out of season");
    },
  },
  {
    name: "Cymbidium in a warm room all year: grows, won't spike",
    season: () => spotYear({ month: steady(18, 24, { rh: 55, lux: 25000 }) }),
    plant: "cymbidium",
    verdict: "possible with care",
    source: "AOS Cymbidium culture sheet: a room that never cools grows it without flowers",
  },
  {
    name: "warm nights for a cool grower: Masdevallia at 21 °C nights, 24 °C days all year",
    season: () => spotYear({ month: steady(21, 24, { rh: 80, lux: 5000 }) }),
    plant: "masdevallia",
    verdict: "struggles here",
    source: "culture guidance for cool pleurothallids (memory): warm nights stop growth and flowering",
    check: (r) => expect(rule(r, "warm-nights").level).toBe("poor"),
  },
  {
    name: "Masdevallia through 15 days at 28 °C: past its heat damage line",
    season: () =>
      spotYear({
        month: byMonth(() => ({ night: 13, day: 20, rh: 80, lux: 5000 })),
        patches: Array.from({ length: 15 }, (_, i) => dip(7, i + 1, 13, 28)),
      }),
    plant: "masdevallia",
    verdict: "struggles here",
    source: "library profile (memory): heat above about 27 °C kills Masdevallia",
    check: (r) => expect(rule(r, "hot-days").facts[0]).toMatchObject({ kind: "heat-damage", days: 15 }),
  },
  {
    name: "cool humid room for Masdevallia: thrives",
    season: () => spotYear({ month: steady(12, 19, { rh: 80, lux: 5000 }) }),
    plant: "masdevallia",
    verdict: "thrives here",
    source: "culture guidance for cool pleurothallids (memory): cool, humid, shaded",
  },
  {
    name: "three weeks at 30 °C for Phalaenopsis: a hot spell, not a fail",
    season: () =>
      spotYear({
        month: steady(19, 24, { lux: 7000 }),
        patches: Array.from({ length: 21 }, (_, i) => dip(7, i + 1, 13, 30)),
      }),
    plant: "phalaenopsis",
    verdict: "possible with care",
    source: "AOS Phalaenopsis culture sheet: days to 85 °F, more with shade; harm well above 30 °C (memory)",
    check: (r) => expect(["heat-season", "heat-snap"]).toContain(rule(r, "hot-days").facts[0].kind),
  },
  {
    name: "Cattleya with a 12 °C swing between the day's high and the night's low",
    season: () => spotYear({ month: steady(15, 27, { lux: 25000 }) }),
    plant: "cattleya",
    verdict: "possible with care",
    source: "AOS Cattleya culture sheet: 8–11 °C day–night differential (light too bright in summer here)",
    check: (r) => expect(rule(r, "flowering").facts[0]).toMatchObject({ kind: "dif-met" }),
  },
  {
    name: "Cattleya with only a 4 °C swing: flowers poorly",
    season: () => spotYear({ month: steady(20, 24, { lux: 20000 }) }),
    plant: "cattleya",
    verdict: "possible with care",
    source: "AOS Cattleya culture sheet: 8–11 °C day–night differential",
    check: (r) => expect(rule(r, "flowering").facts[0]).toMatchObject({ kind: "dif-missed", bestC: 4 }),
  },
  {
    name: "cool, dry winter rest for nobile Dendrobium",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: m >= 10 || m === 1 ? 8 : 15,
          day: m >= 10 || m === 1 ? 17 : 25,
          rh: 55,
          lux: 20000,
        })),
      }),
    plant: "dendrobium-nobile",
    verdict: "thrives here",
    source: "REFERENCES.md (common practice): nobile Dendrobium needs a cool, nearly dry winter rest",
    check: (r) => {
      const fl = rule(r, "flowering");
      expect(fl.facts[0]).toMatchObject({ kind: "cue-met", dryRest: true });
      expect(describeReason(fl)).toContain("nearly dry");
    },
  },
  {
    name: "Maudiae through a winter of 14 °C nights: slows, not harmed",
    season: () => spotYear({ month: byMonth((m) => ({ night: m >= 11 || m <= 2 ? 14 : 18, day: 22, lux: 5000 })) }),
    plant: "paphiopedilum-mottled",
    verdict: "possible with care",
    source: "AOS Paphiopedilum culture sheet: warm types 16–18 °C nights; brief cooler nights survived",
    check: (r) =>
      expect(rule(r, "cold-nights").facts[0]).toMatchObject({ kind: "cold-season", months: [11, 12, 1, 2] }),
  },
  {
    name: "Maudiae through a winter of 11 °C nights: a cold season near its damage line",
    season: () => spotYear({ month: byMonth((m) => ({ night: m >= 11 || m <= 2 ? 11 : 18, day: 22, lux: 5000 })) }),
    plant: "paphiopedilum-mottled",
    verdict: "struggles here",
    source: "AOS Paphiopedilum culture sheet (warm types want 60–65 °F nights); Reid (1991) chilling below 10 °C",
  },
  {
    name: "Odontoglossum in a warm living room: a cool grower, out of place",
    season: () => spotYear({ month: steady(20, 26, { lux: 9000 }) }),
    plant: "odontoglossum",
    verdict: "struggles here",
    source: "AOS Odontoglossum guidance (memory): cool nights 10–13 °C, days under 24 °C",
  },
  {
    name: "summer-only bench: Cymbidium good from May to September",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: summer(m) ? 12 : m === 4 || m === 10 ? 5 : -2,
          day: summer(m) ? 22 : 8,
          rh: 70,
          lux: 30000,
        })),
      }),
    plant: "cymbidium",
    context: bench,
    verdict: "good for part of the year",
    source: "common practice (REFERENCES.md): cymbidiums summer outdoors and come in before frost",
  },
  {
    name: "summer-only bench with a hot July: Odontoglossum suits it for two months around it, not in July",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: summer(m) ? 12 : m === 4 || m === 10 ? 5 : -2,
          day: summer(m) ? (m === 7 ? 28 : 22) : 8,
          rh: 70,
          lux: 12000,
        })),
      }),
    plant: "odontoglossum",
    context: bench,
    verdict: "good for part of the year",
    source: "AOS Odontoglossum guidance (memory): days under 24 °C; summer heat over about 29 °C harms",
  },
  {
    name: "summer-only bench: Phalaenopsis never suits it",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: summer(m) ? 12 : m === 4 || m === 10 ? 5 : -2,
          day: summer(m) ? 22 : 8,
          rh: 70,
          lux: 30000,
        })),
      }),
    plant: "phalaenopsis",
    context: bench,
    verdict: "struggles here",
    source: "AOS Phalaenopsis culture sheet: nights above 16 °C",
  },
];

describe("spot scenarios, each with the verdict an experienced grower would give: temperature and flowering", () => {
  it("has at least 20 scenarios", () => expect(SCENARIOS.length).toBeGreaterThanOrEqual(20));
  judgeScenarios(SCENARIOS);
});

describe("seasonal use", () => {
  it("says when an outdoor bench suits a group and the night to bring it in before, in the grower's unit", () => {
    const season = spotYear({
      month: byMonth((m) => ({
        night: summer(m) ? 12 : m === 4 || m === 10 ? 5 : -2,
        day: summer(m) ? 22 : 8,
        rh: 70,
        lux: 30000,
      })),
    });
    const fit = fitPlant(plantByKey("cymbidium")!, season, undefined, bench);
    expect(fit.seasonal).toEqual({ months: [5, 6, 7, 8, 9], bringInBelowC: 4.5 });
    expect(describeSeasonal(fit.seasonal!)).toBe(
      "Good from May to September; bring it in before nights fall under 4.5 °C.",
    );
    expect(describeSeasonal(fit.seasonal!, { unit: "F" })).toBe(
      "Good from May to September; bring it in before nights fall under 40.1 °F.",
    );
    // Indoors the same temperatures are judged for the whole year: no seasonal use.
    expect(fitPlant(plantByKey("cymbidium")!, season, undefined, east).seasonal).toBeNull();
  });
});

describe("ranking by how far the spot misses", () => {
  it("on a frost bench the hardiest groups come first and warm growers last (common practice)", () => {
    const frost = spotYear({
      month: byMonth((m) => ({ night: summer(m) ? 10 : -4, day: summer(m) ? 20 : 5, rh: 75 })),
    });
    const ranked = rankPlantsForSpot(PLANT_LIBRARY, frost, undefined, bench);
    const keys = ranked.map((r) => r.plant.key);
    expect(keys[0]).toBe("pleione");
    for (const warm of ["phalaenopsis", "vanda", "nepenthes-lowland"])
      expect(keys.indexOf(warm)).toBeGreaterThan(keys.length - 10);
    // damage-hours rise down the list among those that struggle
    const struggling = ranked.filter((r) => r.fit.verdict === "struggles here").map((r) => r.fit.miss.damage);
    expect([...struggling].sort((a, b) => a - b)).toEqual(struggling);
  });

  it("an ordinary heated room doesn't rule out most groups", () => {
    const room = spotYear({
      month: byMonth((m) => ({ night: m >= 11 || m <= 3 ? 16 : 18, day: 22, rhDay: 45, rhNight: 60 })),
    });
    const ranked = rankPlantsForSpot(PLANT_LIBRARY, room, undefined, east);
    const struggles = ranked.filter((r) => r.fit.verdict === "struggles here").length;
    expect(struggles).toBeLessThanOrEqual(4);
    expect(ranked[0].fit.verdict).toBe("thrives here");
  });
});
