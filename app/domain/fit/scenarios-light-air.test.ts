// Spot scenarios of light, dryness and damp air, each with the verdict an experienced grower would
// give and the source of that judgement beside it (temperature and flowering: scenarios.test.ts).
import { describe, expect, it } from "vitest";
import {
  byMonth,
  east,
  judgeScenarios,
  northEast,
  rule,
  south,
  steady,
  summer,
  type Scenario,
} from "~/domain/fit/scenario-kit";
import { spotYear } from "~/domain/fit/season-fixture";

const SCENARIOS: Scenario[] = [
  {
    name: "dry heated winter: 30 % by day, 70 % by night (mean about 50 %)",
    season: () =>
      spotYear({
        month: byMonth((m) => ({
          night: 18,
          day: 22,
          lux: 7000,
          ...(m >= 11 || m <= 3 ? { rhDay: 30, rhNight: 70 } : { rh: 60 }),
        })),
      }),
    plant: "phalaenopsis",
    verdict: "possible with care",
    source: "AOS Phalaenopsis culture sheet: 50–80 %; the dry part of the day is what harms (issue 15)",
    check: (r) =>
      expect(rule(r, "humidity").facts[0]).toMatchObject({
        kind: "humidity-dry",
        months: [11, 12, 1, 2, 3],
        typicalDailyMinPct: 30,
      }),
  },
  {
    name: "north-east window, no light sensor: Vanda too dim",
    season: () => spotYear({ month: steady(19, 26, { rh: 65 }) }),
    plant: "vanda",
    context: northEast,
    verdict: "possible with care",
    source:
      "AOS Vanda guidance (memory): strong light with several hours of sun; a NE window at 51.5° N gets under an hour October–February",
    check: (r) => expect(rule(r, "light").facts[0]).toMatchObject({ kind: "light-window", verdict: "shade" }),
  },
  {
    name: "south window, no light sensor: Phalaenopsis needs shade from spring and late-summer sun",
    season: () => spotYear({ month: steady(19, 24) }),
    plant: "phalaenopsis",
    context: south,
    verdict: "possible with care",
    source: "AOS Phalaenopsis culture sheet: little or no direct sun",
    check: (r) => expect(rule(r, "light").facts[0]).toMatchObject({ kind: "light-window", verdict: "scorch" }),
  },
  {
    name: "east window, no light sensor: Phalaenopsis in its classic window",
    season: () => spotYear({ month: steady(19, 24) }),
    plant: "phalaenopsis",
    context: east,
    verdict: "thrives here",
    source: "AOS Phalaenopsis culture sheet: an east window is ideal",
  },
  {
    name: "June at 19 mol, December at 3: a low-light group scorched in summer, the mean hides it",
    season: () =>
      spotYear({
        month: byMonth((m) => ({ night: 19, day: 24, lux: summer(m) ? 17500 : m === 12 || m === 1 ? 6500 : 9000 })),
      }),
    plant: "phalaenopsis",
    verdict: "struggles here",
    source:
      "AOS Phalaenopsis culture sheet: little or no direct sun; DLI over twice its maximum burns leaves (common practice)",
    check: (r) => {
      const light = rule(r, "light");
      expect(light.facts[0]).toMatchObject({ kind: "light-months" });
      expect((light.facts[0] as { scorch: number[] }).scorch).toEqual(expect.arrayContaining([5, 6, 7]));
    },
  },
  {
    name: "shaded shelf: steady 22 °C and light in band",
    season: () => spotYear({ month: steady(21, 23, { rh: 60, lux: 5000 }) }),
    plant: "paphiopedilum-mottled",
    verdict: "thrives here",
    source: "AOS Paphiopedilum culture sheet: warm mottled types, shade",
  },
  {
    name: "dark corner: DLI about 1 all year",
    season: () => spotYear({ month: steady(19, 24, { lux: 1500 }) }),
    plant: "phalaenopsis",
    verdict: "struggles here",
    source: "common practice: a Phalaenopsis needs a bright window or a grow light",
  },
  {
    name: "humid terrarium at 89 %: damp air is expected for Masdevallia",
    season: () => spotYear({ month: steady(12, 19, { rh: 89, dpMargin: 1.5, lux: 5000 }) }),
    plant: "masdevallia",
    verdict: "thrives here",
    source: "culture guidance for cool pleurothallids (memory): 70–90 % with moving air",
    check: (r) => expect(rule(r, "condensation").facts[0]).toMatchObject({ kind: "condensation-wet", expected: true }),
  },
  {
    name: "steamy bathroom for Phalaenopsis: wet leaves most of the time",
    season: () => spotYear({ month: steady(19, 24, { rh: 78, dpMargin: 1.5, lux: 6000 }) }),
    plant: "phalaenopsis",
    verdict: "possible with care",
    source: "common practice: water standing in the crown rots Phalaenopsis",
    check: (r) => expect(rule(r, "condensation").level).toBe("care"),
  },
];

describe("spot scenarios, each with the verdict an experienced grower would give: light and air", () => {
  it("has at least 8 scenarios", () => expect(SCENARIOS.length).toBeGreaterThanOrEqual(8));
  judgeScenarios(SCENARIOS);
});
