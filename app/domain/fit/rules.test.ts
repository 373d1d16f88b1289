import { describe, expect, it } from "vitest";
import {
  DEFAULT_FIT_THRESHOLDS as T,
  coldNights,
  condensation,
  cyclicOrder,
  describeMonths,
  floweringNeeds,
  formatNumber,
  FIT_RULES,
  hotDays,
  humidityBand,
  judgeAll,
  lightBand,
} from "~/domain/fit/rules";
import { coldSnaps, hotAfternoons, spotYear, steadyRoom, type HourPatch } from "~/domain/fit/season-fixture";
import { PLANT_LIBRARY, plantByKey, type PlantProfile } from "~/domain/plants/library";
import type { SeasonProfile } from "~/domain/season/types";

// Thresholds here are the product's own (DEFAULT_FIT_THRESHOLDS), common practice unless noted.
const phal = plantByKey("phalaenopsis")!; // nights ≥ 16 °C, days ≤ 29 °C, 50–80 %, DLI 4–8
const cymbidium = plantByKey("cymbidium")!; // cool period: nights ≤ 13 °C for 4 weeks
const cattleya = plantByKey("cattleya")!; // day–night difference 8 °C
const paphWarm = plantByKey("paphiopedilum-mottled")!; // no flowering cue

const room = spotYear(); // 18 °C nights, 24 °C days, 60 %, dew-point margin 8 °C, no light sensor
const withPatches = (patches: HourPatch[]) => spotYear({ patches });

describe("month wording", () => {
  it("reads months in the order of the year they span", () => {
    expect(cyclicOrder([1, 2, 11, 12])).toEqual([11, 12, 1, 2]);
    expect(describeMonths([12, 1, 2, 11])).toBe("between November and February");
    expect(describeMonths([8, 7])).toBe("in July and August");
    expect(describeMonths([12, 1])).toBe("in December and January");
    expect(describeMonths([6, 1, 3])).toBe("in January, March and June");
    expect(describeMonths([4])).toBe("in April");
    expect(describeMonths([1, 2, 3, 4, 5, 6, 9])).toBe("in January–June and September");
    expect(describeMonths([])).toBe("");
  });

  it("formats numbers to one decimal without trailing zeros", () => {
    expect(formatNumber(13)).toBe("13");
    expect(formatNumber(7.24)).toBe("7.2");
    expect(formatNumber(-0.04)).toBe("0");
  });
});

describe("coldNights", () => {
  it("is fine when nights stay at the safe night", () => {
    expect(coldNights(phal, room, T)).toMatchObject({ level: "ok" });
    expect(coldNights(phal, withPatches(coldSnaps(1, 1, 16)), T).level).toBe("ok");
  });

  it("asks for care on a night just under it", () => {
    const r = coldNights(phal, withPatches(coldSnaps(1, 1, 15.9)), T);
    expect(r).toMatchObject({ level: "care", months: ["01"] });
    expect(r.message).toBe(
      "Nights dipped just under 16 °C on 1 night in January (lowest 15.9 °C); this group wants 16 °C or more. " +
        "Moving it back from the glass or bringing it in on the coldest nights may be enough.",
    );
  });

  it(`turns poor once the lowest is more than ${T.nightPoorMarginC} °C under`, () => {
    expect(coldNights(phal, withPatches(coldSnaps(1, 1, 14)), T).level).toBe("care");
    expect(coldNights(phal, withPatches(coldSnaps(1, 1, 13.9)), T).level).toBe("poor");
  });

  it(`turns poor after more than ${T.nightPoorCount} nights under`, () => {
    expect(coldNights(phal, withPatches(coldSnaps(1, T.nightPoorCount, 15)), T).level).toBe("care");
    expect(coldNights(phal, withPatches(coldSnaps(1, T.nightPoorCount + 1, 15)), T).level).toBe("poor");
  });

  it(`counts only nights more than ${T.nightCountMarginC} °C under towards poor (sensor accuracy)`, () => {
    const near = coldNights(phal, withPatches(coldSnaps(1, T.nightPoorCount + 5, 16 - T.nightCountMarginC)), T);
    expect(near.level).toBe("care");
    expect(near.message).toMatch(/^Nights ran a touch under 16 °C on 15 nights in January \(lowest 15.5 °C\), never more than 0.5 °C under/);
    expect(coldNights(phal, withPatches(coldSnaps(1, T.nightPoorCount + 1, 15.4)), T).level).toBe("poor");
  });

  it("says how many nights, when, and how cold", () => {
    const season = withPatches([...coldSnaps(11, 10, 12), ...coldSnaps(12, 11, 9), ...coldSnaps(1, 12, 7), ...coldSnaps(2, 8, 11)]);
    const r = coldNights(phal, season, T);
    expect(r.level).toBe("poor");
    expect(r.months).toEqual(["11", "12", "01", "02"]);
    expect(r.message).toMatch(/^Nights fell below 16 °C on 41 nights between November and February \(lowest 7 °C\); this group wants 16 °C or more\./);
    expect(r.message).toContain(phal.coldTolerance);
  });
});

describe("hotDays", () => {
  it("is fine at the comfortable day, care just over it", () => {
    expect(hotDays(phal, withPatches(hotAfternoons(7, 1, 29)), T).level).toBe("ok");
    const r = hotDays(phal, withPatches(hotAfternoons(7, 1, 29.1)), T);
    expect(r.level).toBe("care");
    // Blanchard & Runkle (2006): no spikes at 29 °C days, so the heat costs Phalaenopsis its flowers.
    expect(r.message).toContain("Phalaenopsis may not spike");
  });

  it(`turns poor more than ${T.dayPoorMarginC} °C over`, () => {
    expect(hotDays(phal, withPatches(hotAfternoons(7, 1, 29 + T.dayPoorMarginC)), T).level).toBe("care");
    expect(hotDays(phal, withPatches(hotAfternoons(7, 1, 29.1 + T.dayPoorMarginC)), T).level).toBe("poor");
  });

  it(`turns poor after more than ${T.dayPoorCount} hot days`, () => {
    const twenty = [...hotAfternoons(7, 15, 30), ...hotAfternoons(8, 5, 30)];
    const r = hotDays(phal, withPatches(twenty), T);
    expect(r.level).toBe("care");
    expect(r.message).toMatch(/^Days went above 29 °C on 20 days in July and August \(highest 30 °C\) — Phalaenopsis may not spike;/);
    expect(hotDays(phal, withPatches([...twenty, ...hotAfternoons(8, 6, 30).slice(5)]), T).level).toBe("poor");
  });

  it("leaves the spiking remark out for groups not cued by cool days", () => {
    expect(hotDays(paphWarm, withPatches(hotAfternoons(7, 1, 30)), T).message).not.toContain("spike");
  });
});

describe("humidityBand", () => {
  const dryJanuary = (rh: number) => spotYear({ month: (m) => ({ ...steadyRoom(m), rh: m === 1 ? rh : 60 }) });

  it("is fine at the band's edges", () => {
    expect(humidityBand(phal, room, T)).toMatchObject({ level: "ok" });
    expect(humidityBand(phal, dryJanuary(50), T).level).toBe("ok");
    expect(humidityBand(phal, dryJanuary(80), T).level).toBe("ok");
  });

  it("asks for care in dry air and says a tray helps", () => {
    const r = humidityBand(phal, dryJanuary(49.5), T);
    expect(r).toMatchObject({ level: "care", months: ["01"] });
    expect(r.message).toContain("in January; this group wants 50–80 %");
    expect(r.message).toContain("tray of wet gravel");
  });

  it("asks for air movement when the air is damper than the band", () => {
    const r = humidityBand(phal, dryJanuary(80.5), T);
    expect(r.level).toBe("care");
    expect(r.message).toContain("more air movement");
  });
});

describe("lightBand", () => {
  // Constructed from a real profile by setting each month's mean DLI.
  const withDli = (dli: number): SeasonProfile => {
    const s = structuredClone(room);
    for (const m of s.year) m.light = { meanDli: dli, daysWithLight: 28 };
    return s;
  };

  it("notes when the spot has no light sensor", () => {
    const r = lightBand(phal, room, T);
    expect(r).toMatchObject({ level: "ok", noData: true });
    expect(r.message).toContain("No light sensor in this spot");
    expect(r.message).toContain("window facing is outside this rule");
  });

  it("is fine inside the band, care just outside", () => {
    expect(lightBand(phal, withDli(4), T).level).toBe("ok");
    expect(lightBand(phal, withDli(8), T).level).toBe("ok");
    expect(lightBand(phal, withDli(3.99), T).level).toBe("care");
    expect(lightBand(phal, withDli(8.01), T).level).toBe("care");
  });

  it("turns poor far outside the band", () => {
    expect(lightBand(phal, withDli(4 * T.lightLowPoorFactor), T).level).toBe("care");
    expect(lightBand(phal, withDli(4 * T.lightLowPoorFactor - 0.01), T).level).toBe("poor");
    expect(lightBand(phal, withDli(8 * T.lightHighPoorFactor), T).level).toBe("care");
    expect(lightBand(phal, withDli(8 * T.lightHighPoorFactor + 0.01), T).level).toBe("poor");
  });

  it("judges measured sunlight end to end", () => {
    // 10 klux of sunlight while the sun is up (≈ 0.67 mol m⁻² d⁻¹ per hour, Thimijan & Heins 1983 factor 54).
    const season = spotYear({ month: (m) => ({ ...steadyRoom(m), lux: 10_000 }) });
    const r = lightBand(phal, season, T);
    expect(r.message).toMatch(/^Daily light averaged [\d.]+ mol m⁻² d⁻¹ over 12 months with light readings; this group wants 4–8 mol m⁻² d⁻¹/);
    expect(r.level).toBe("care"); // about 8.1 on average: a touch brighter than the band
  });
});

describe("floweringNeeds", () => {
  it("finds Phalaenopsis' cool days in a steady room (days 24 °C ≤ 26 °C)", () => {
    expect(floweringNeeds(phal, room, T).level).toBe("ok");
  });

  it("warns that a warm room grows Phalaenopsis without spikes", () => {
    const at = (day: number) => spotYear({ month: (m) => ({ ...steadyRoom(m), day }) });
    expect(floweringNeeds(phal, at(26), T).level).toBe("ok");
    const r = floweringNeeds(phal, at(26.5), T);
    expect(r.level).toBe("care");
    expect(r.message).toContain("may grow here but not flower");
  });

  it("says a heated room that never cools grows Cymbidium but may not flower it", () => {
    const r = floweringNeeds(cymbidium, room, T);
    expect(r.level).toBe("care");
    expect(r.message).toBe(
      "It never had nights at or below 13 °C; Cymbidium needs about 4 weeks of them (late summer into autumn) to flower — it may grow here but not flower.",
    );
  });

  it(`counts a cool spell when ${T.coolSpellShare * 100} % of the days in 4 weeks qualify`, () => {
    const needed = Math.ceil(28 * T.coolSpellShare); // 23 of 28
    const ok = floweringNeeds(cymbidium, withPatches(coldSnaps(10, needed, 12)), T);
    expect(ok).toMatchObject({ level: "ok", months: ["10"] });
    expect(ok.message).toContain(`on ${needed} of 28 days in October`);
    const short = floweringNeeds(cymbidium, withPatches(coldSnaps(10, needed - 1, 12)), T);
    expect(short.level).toBe("care");
    expect(short.message).toContain(`At best ${needed - 1} of any 28 days`);
  });

  it("checks the day–night difference at and below the need", () => {
    const dif = (day: number) => spotYear({ month: (m) => ({ ...steadyRoom(m), night: 18, day }) });
    expect(floweringNeeds(cattleya, dif(26), T).level).toBe("ok"); // 8 °C drop = need
    const r = floweringNeeds(cattleya, dif(25.9), T);
    expect(r.level).toBe("care");
    expect(r.message).toBe("Days ran at most 7.9 °C warmer than nights in any month; Cattleya flowers best with about 8 °C — it may grow but flower poorly.");
  });

  it("needs no cue for groups without one", () => {
    expect(floweringNeeds(paphWarm, room, T)).toMatchObject({ level: "ok" });
    expect(floweringNeeds(paphWarm, room, T).message).toMatch(/^No temperature cue needed to flower\./);
  });
});

describe("condensation", () => {
  // January has 744 hours; the care line is 10 % of them = 74.4 hours.
  const wetHours = (n: number): HourPatch[] =>
    Array.from({ length: n }, (_, i) => ({ month: 1, dayOfMonth: Math.floor(i / 24) + 1, hour: i % 24, value: { dp: 1.5 } }));

  it("is fine with few hours near the dew point", () => {
    expect(condensation(phal, room, T).message).toContain("for 0 hours in all");
    expect(condensation(phal, withPatches(wetHours(74)), T).level).toBe("ok");
  });

  it("asks for care when a month is often within 2 °C of the dew point", () => {
    const r = condensation(phal, withPatches(wetHours(75)), T);
    expect(r).toMatchObject({ level: "care", months: ["01"] });
    expect(r.message).toContain("within 2 °C of the dew point for 75 hours");
    expect(r.message).toContain("10 % of the hours in January");
    expect(r.message).toContain("fungal");
  });
});

describe("rules without readings", () => {
  const empty = spotYear({ observed: [] });
  it("judge nothing and say so", () => {
    for (const rule of [coldNights, hotDays, humidityBand, lightBand, floweringNeeds, condensation]) {
      expect(rule(cymbidium, empty, T)).toMatchObject({ level: "ok", noData: true });
    }
  });
});

describe("shared rule results (judgeAll)", () => {
  // A fit table judges each distinct (season, rule inputs) case once. If a rule read a profile field
  // its sharing key leaves out, a plant differing only in that field would get another plant's
  // result: change each field in turn, after the original filled the cache, and compare with the
  // rule called directly.
  const seasons = [
    room,
    spotYear({ month: (m) => ({ night: 6 + Math.abs(m - 7) * -0.5 + 8, day: 20 + (m > 4 && m < 10 ? 12 : 0), rh: 40 + m * 3, lux: 9000 + m * 800, dpMargin: m === 1 ? 1 : 5 }) }),
    spotYear({ observed: [1, 2, 3, 10, 11, 12], patches: [...coldSnaps(1, 12, 4), ...hotAfternoons(2, 3, 35)] }),
  ];
  const variants = (p: PlantProfile): PlantProfile[] => [
    { ...p, key: `${p.key}-a`, minNightC: p.minNightC - 3 },
    { ...p, key: `${p.key}-b`, maxDayC: p.maxDayC + 3 },
    { ...p, key: `${p.key}-c`, humidityMin: p.humidityMin + 15, humidityMax: p.humidityMax - 5 },
    { ...p, key: `${p.key}-d`, dliMin: p.dliMin * 3, dliMax: p.dliMax * 3 },
    { ...p, key: `${p.key}-e`, name: `Other${p.name}`, coldTolerance: `${p.coldTolerance}!` },
    { ...p, key: `${p.key}-f`, flowering: { ...p.flowering, difC: (p.flowering.difC ?? 4) + 3, note: `${p.flowering.note}.` } },
    { ...p, key: `${p.key}-g`, flowering: { ...p.flowering, coolPeriod: { weeks: 3, maxNightC: 12, maxDayC: 22, months: "in autumn" } } },
  ];
  it("gives every plant exactly what the rules give it on their own", () => {
    for (const season of seasons) {
      for (const plant of PLANT_LIBRARY) {
        for (const p of [plant, ...variants(plant)]) {
          expect(judgeAll(p, season, T)).toEqual(FIT_RULES.map((rule) => rule(p, season, T)));
        }
      }
    }
  });
});
