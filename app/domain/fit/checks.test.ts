import { describe, expect, it } from "vitest";
import { DEFAULT_FIT_THRESHOLDS as T, cyclicOrder, hemisphereMonths, linesOf } from "~/domain/fit/facts";
import { coldNights, hotDays, warmNights } from "~/domain/fit/temperature";
import { condensation } from "~/domain/fit/condensation";
import { FIT_CHECKS, judgeAll } from "~/domain/fit/checks";
import { floweringNeeds } from "~/domain/fit/flowering";
import { humidityBand, lightBand } from "~/domain/fit/humidity-light";
import { day, describeFact, describeMonths, describeReason, formatNumber, temp } from "~/domain/fit/describe";
import { coldSnaps, hotAfternoons, spotYear, steadyRoom, type HourPatch } from "~/domain/fit/season-fixture";
import { PLANT_LIBRARY, plantByKey, type PlantProfile } from "~/domain/plants/library";

// Lines here are the library's (sources in library.ts) and the thresholds the product's own
// (DEFAULT_FIT_THRESHOLDS), common practice unless noted.
const phal = plantByKey("phalaenopsis")!; // comfort nights ≥ 16 °C, damage under 10 °C; days ≤ 29, damage over 35
const cymbidium = plantByKey("cymbidium")!; // comfort ≥ 7 °C, damage under 2 °C; cue Aug–Nov nights ≤ 13 °C
const cattleya = plantByKey("cattleya")!; // day–night 8 °C
const masdevallia = plantByKey("masdevallia")!; // max night 16 °C, heat damage 27 °C
const F = { unit: "F" as const, locale: "en-US" };

const room = spotYear(); // 18 °C nights, 24 °C days, 60 %, dew-point margin 8 °C, no light sensor
const withPatches = (patches: HourPatch[]) => spotYear({ patches });

describe("month and number wording", () => {
  it("reads months in the order of the year they span", () => {
    expect(cyclicOrder([1, 2, 11, 12])).toEqual([11, 12, 1, 2]);
    expect(describeMonths([12, 1, 2, 11])).toBe("from November to February");
    expect(describeMonths([8, 7])).toBe("in July and August");
    expect(describeMonths([6, 1, 3])).toBe("in January, March and June");
    expect(describeMonths([1, 2, 3, 4, 5, 6, 9])).toBe("in January–June and September");
    expect(describeMonths([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12])).toBe("all year");
  });

  it("formats numbers, temperatures and dates in the grower's unit and locale", () => {
    expect(formatNumber(13)).toBe("13");
    expect(formatNumber(-0.04)).toBe("0");
    expect(formatNumber(7.25, "de-DE")).toBe("7,3");
    expect(temp(16, { unit: "C" })).toBe("16 °C");
    expect(temp(16, F)).toBe("60.8 °F");
    expect(temp(4.9, { unit: "C", locale: "de-DE" })).toBe("4,9 °C");
    expect(day("2026-01-17", { unit: "C", locale: "en-GB" })).toBe("17 Jan");
    expect(day("2026-01-17", F)).toBe("Jan 17");
  });
});

describe("cold nights: comfort line, damage line, snap or season", () => {
  it("is good at the comfort night and within a sensor's half degree of it", () => {
    expect(coldNights(phal, room, T).level).toBe("good");
    expect(coldNights(phal, withPatches(coldSnaps(1, 1, 15.5)), T).level).toBe("good");
  });

  it("names a brief dip past comfort but above damage: the night, its low and its hours — care, not a fail", () => {
    const r = coldNights(phal, withPatches(coldSnaps(1, 1, 13.9)), T);
    expect(r).toMatchObject({
      level: "care",
      months: ["01"],
      facts: [
        {
          kind: "cold-snap",
          nights: 1,
          comfortC: 16,
          damageC: 10,
          worst: [{ date: "2025-01-01", valueC: 13.9, hours: 1 }],
        },
      ],
    });
    expect(describeReason(r)).toBe(
      "A brief cold snap: 1 night under 16 °C (1 Jan: 13.9 °C for 1 hour), above the 10 °C damage line — cover it or bring it in on such nights.",
    );
    // The same facts in °F for a grower who chose it.
    expect(describeReason(r, F)).toBe(
      "A brief cold snap: 1 night under 60.8 °F (Jan 1: 57 °F for 1 hour), above the 50 °F damage line — cover it or bring it in on such nights.",
    );
  });

  it("is poor once the damage line is crossed, even for one night", () => {
    const r = coldNights(phal, withPatches(coldSnaps(1, 1, 9.9)), T);
    expect(r).toMatchObject({ level: "poor", facts: [{ kind: "cold-damage", nights: 1 }] });
    expect(r.miss!.damage).toBeGreaterThan(0);
  });

  it(`tells a season (${T.seasonNights} nights within ${T.seasonWindowDays} days) from a snap`, () => {
    expect(coldNights(phal, withPatches(coldSnaps(1, T.seasonNights - 1, 14)), T).facts[0].kind).toBe("cold-snap");
    const season = coldNights(phal, withPatches(coldSnaps(1, T.seasonNights, 14)), T);
    expect(season).toMatchObject({
      level: "care",
      facts: [{ kind: "cold-season", nights: T.seasonNights, typicalLowC: 14 }],
    });
    expect(describeReason(season)).toMatch(
      /^A cold season, not a snap: 10 nights under 16 °C in January, typically 14 °C/,
    );
  });

  it("is poor for a season whose typical night sits nearer the damage line than comfort", () => {
    expect(coldNights(phal, withPatches(coldSnaps(1, 20, 12.9)), T).level).toBe("poor");
    expect(coldNights(phal, withPatches(coldSnaps(1, 20, 13.1)), T).level).toBe("care");
  });

  it("takes a Cymbidium's 4.9 °C night as a snap (AOS: nights near 2–4 °C without frost)", () => {
    expect(coldNights(cymbidium, withPatches(coldSnaps(1, 1, 4.9)), T)).toMatchObject({
      level: "care",
      facts: [{ kind: "cold-snap" }],
    });
  });

  it("defaults the damage line to 4 °C under comfort for a profile without one", () => {
    const own: PlantProfile = { ...phal, key: "own", damageNightC: undefined, damageDayC: undefined };
    expect(linesOf(own)).toMatchObject({ damageNightC: 12, damageDayC: 33 });
  });
});

describe("warm nights for cool growers", () => {
  it("is poor for Masdevallia through a season of 18–21 °C nights (warm nights stop it flowering)", () => {
    const warm = spotYear({ month: () => ({ night: 21, day: 24, rh: 80 }) });
    const r = warmNights(masdevallia, warm, T);
    expect(r).toMatchObject({ level: "poor", facts: [{ kind: "warm-nights", maxNightC: 16, season: true }] });
    expect(describeReason(r, F, "Masdevallia")).toContain("above 60.8 °F");
  });

  it("is care for a season just over the maximum night, good for a few warm nights", () => {
    expect(warmNights(masdevallia, spotYear({ month: () => ({ night: 17, day: 22 }) }), T).level).toBe("care");
    expect(
      warmNights(masdevallia, spotYear({ month: () => ({ night: 12, day: 20 }), patches: coldSnaps(7, 3, 19) }), T)
        .level,
    ).toBe("good");
  });

  it("doesn't apply to groups without a maximum night", () => {
    expect(warmNights(phal, room, T)).toMatchObject({ level: "good", facts: [] });
  });
});

describe("hot days", () => {
  it("is poor past the heat damage line (Masdevallia above 27 °C)", () => {
    const r = hotDays(masdevallia, withPatches(hotAfternoons(7, 1, 28)), T);
    expect(r).toMatchObject({
      level: "poor",
      facts: [{ kind: "heat-damage", days: 1, damageC: 27, worst: [{ date: "2025-07-01", valueC: 28, hours: 1 }] }],
    });
  });

  it("is care for a hot spell under the damage line, and says Phalaenopsis won't spike in a hot season", () => {
    expect(hotDays(phal, withPatches(hotAfternoons(7, 3, 31)), T)).toMatchObject({
      level: "care",
      facts: [{ kind: "heat-snap", costsSpikes: true }],
    });
    const season = hotDays(phal, withPatches(hotAfternoons(7, 21, 30)), T);
    expect(season).toMatchObject({ level: "care", facts: [{ kind: "heat-season", days: 21 }] });
    expect(describeReason(season, undefined, "Phalaenopsis")).toContain(
      "Phalaenopsis won't spike while days stay this warm",
    );
    expect(hotDays(phal, withPatches(hotAfternoons(7, 21, 33)), T).level).toBe("poor");
  });
});

describe("humidity by its dry hours", () => {
  it("catches a heated room at 30 % by day and 70 % by night, whose mean (about 50 %) would pass", () => {
    const season = spotYear({ month: (m) => ({ ...steadyRoom(m), ...(m === 1 ? { rhDay: 30, rhNight: 70 } : {}) }) });
    expect(season.year[0].humidity.mean).toBeGreaterThanOrEqual(50);
    const r = humidityBand(phal, season, T);
    expect(r).toMatchObject({
      level: "care",
      months: ["01"],
      facts: [{ kind: "humidity-dry", minPct: 50, typicalDailyMinPct: 30, months: [1] }],
    });
  });

  it("is good when the daily low stays in the band", () => {
    expect(humidityBand(phal, room, T)).toMatchObject({
      level: "good",
      facts: [{ kind: "humidity-ok", lowestDailyMinPct: 60 }],
    });
  });
});

describe("light by month", () => {
  const lux = (f: (m: number) => number) => spotYear({ month: (m) => ({ ...steadyRoom(m), lux: f(m) }) });
  it("sees 19 mol in June and 3 in December, which the yearly mean hides", () => {
    const r = lightBand(
      phal,
      lux((m) => (m >= 5 && m <= 7 ? 17500 : m === 12 ? 5500 : 8000)),
      T,
    );
    const fact = r.facts[0] as { scorch: number[]; months: { month: number; dli: number }[] };
    expect(fact.scorch).toEqual([5, 6, 7]);
    expect(fact.months.find((m) => m.month === 6)!.dli).toBeGreaterThan(18);
    expect(r.level).toBe("poor");
  });

  it("is unknown with no light sensor, never good", () => {
    expect(lightBand(phal, room, T)).toMatchObject({ level: "unknown", noData: true });
  });

  it("notes clipped lux when the season profile says so (luxClipped, optional)", () => {
    const season = lux(() => 7000);
    (season.year[5].light as { luxClipped?: number }).luxClipped = 40;
    expect(lightBand(phal, season, T).facts.map((f) => f.kind)).toContain("light-clipped");
  });

  it("doesn't call a clipped month dim: the chip reads low in direct sun", () => {
    const season = lux((m) => (m === 6 ? 2000 : 9000));
    expect((lightBand(phal, season, T).facts[0] as { dim: number[] }).dim).toContain(6);
    (season.year[5].light as { luxClipped?: boolean }).luxClipped = true;
    const r = lightBand(phal, season, T);
    expect((r.facts[0] as { dim: number[] }).dim).not.toContain(6);
    expect(r.facts.find((f) => f.kind === "light-clipped")).toMatchObject({ months: [6] });
  });
});

describe("flowering cues in their season", () => {
  it("Phalaenopsis spikes in a constant 20 or 23 °C room: day temperature alone (Blanchard & Runkle 2006)", () => {
    for (const t of [20, 23])
      expect(floweringNeeds(phal, spotYear({ month: () => ({ night: t, day: t }) }), T).level).toBe("good");
    expect(floweringNeeds(phal, spotYear({ month: () => ({ night: 22, day: 29 }) }), T).facts[0].kind).toBe(
      "cue-missed",
    );
  });

  it("Cymbidium's cool nights in December–February come too late; in September–October they count", () => {
    const late = floweringNeeds(
      cymbidium,
      spotYear({ month: (m) => ({ night: m === 12 || m <= 2 ? 10 : 16, day: 22 }) }),
      T,
    );
    expect(late).toMatchObject({
      level: "care",
      facts: [{ kind: "cue-missed", outOfSeason: [12, 1, 2], cueMonths: [8, 9, 10, 11] }],
    });
    const autumn = floweringNeeds(
      cymbidium,
      spotYear({ month: (m) => ({ night: m === 9 || m === 10 ? 11 : 16, day: 22 }) }),
      T,
    );
    expect(autumn).toMatchObject({ level: "good", facts: [{ kind: "cue-met" }] });
  });

  it("shifts the cue months by six in the southern hemisphere (hemisphereMonths)", () => {
    expect(hemisphereMonths([8, 9, 10, 11], { hemisphere: "southern" } as never)).toEqual([2, 3, 4, 5]);
    expect(hemisphereMonths([8, 9, 10, 11], { hemisphere: "northern" } as never)).toEqual([8, 9, 10, 11]);
  });

  it("the day–night difference is the day's high minus its low, by month", () => {
    // 16 °C nights, 28 °C days: a 12 °C swing (a mean of day hours minus night hours would say less in winter).
    const r = floweringNeeds(cattleya, spotYear({ month: () => ({ night: 16, day: 28 }) }), T);
    expect(r).toMatchObject({ level: "good", facts: [{ kind: "dif-met", needC: 8 }] });
    expect((r.facts[0] as { months: { difC: number }[] }).months.every((m) => m.difC === 12)).toBe(true);
    expect(describeFact(r.facts[0], F)).toContain("14.4 °F or more"); // 8 K = 14.4 °F
  });

  it("Cymbidium has no day–night requirement of its own", () => {
    expect(cymbidium.flowering.difC).toBeUndefined();
  });
});

describe("condensation reconciled with the group's humidity range", () => {
  const wet = spotYear({ month: (m) => ({ ...steadyRoom(m), rh: 89, dpMargin: 1 }) });
  it("is expected for a group whose range reaches ~88 % (Masdevallia), care for one whose doesn't", () => {
    expect(condensation(masdevallia, wet, T)).toMatchObject({
      level: "good",
      facts: [{ kind: "condensation-wet", expected: true }],
    });
    expect(condensation(phal, wet, T)).toMatchObject({
      level: "care",
      facts: [{ kind: "condensation-wet", expected: false }],
    });
    // Never "inside its range" and "wet 100 % of hours" as a warning at once.
    expect(humidityBand(masdevallia, wet, T).level).toBe("good");
  });
});

describe("rules without readings", () => {
  const empty = spotYear({ observed: [] });
  it("say unknown, never good", () => {
    for (const rule of [coldNights, hotDays, humidityBand, lightBand, floweringNeeds, condensation]) {
      expect(rule(cymbidium, empty, T)).toMatchObject({ level: "unknown", noData: true });
    }
  });
});

describe("shared rule results (judgeAll)", () => {
  // A fit table judges each distinct (season, rule inputs) case once. If a rule read a profile field
  // its sharing key leaves out, a plant differing only in that field would get another plant's result.
  const seasons = [
    room,
    spotYear({
      month: (m) => ({
        night: 6 + Math.abs(m - 7) * -0.5 + 8,
        day: 20 + (m > 4 && m < 10 ? 12 : 0),
        rh: 40 + m * 3,
        lux: 9000 + m * 800,
        dpMargin: m === 1 ? 1 : 5,
      }),
    }),
    spotYear({ observed: [1, 2, 3, 10, 11, 12], patches: [...coldSnaps(1, 12, 4), ...hotAfternoons(2, 3, 35)] }),
  ];
  const variants = (p: PlantProfile): PlantProfile[] => [
    { ...p, key: `${p.key}-a`, minNightC: p.minNightC - 3 },
    { ...p, key: `${p.key}-b`, maxDayC: p.maxDayC + 3 },
    { ...p, key: `${p.key}-c`, humidityMin: p.humidityMin + 15, humidityMax: p.humidityMax - 5 },
    { ...p, key: `${p.key}-d`, dliMin: p.dliMin * 3, dliMax: p.dliMax * 3 },
    { ...p, key: `${p.key}-e`, name: `Other${p.name}`, coldTolerance: `${p.coldTolerance}!` },
    {
      ...p,
      key: `${p.key}-f`,
      flowering: { ...p.flowering, difC: (p.flowering.difC ?? 4) + 3, note: `${p.flowering.note}.` },
    },
    {
      ...p,
      key: `${p.key}-g`,
      flowering: {
        ...p.flowering,
        coolPeriod: { weeks: 3, maxNightC: 12, maxDayC: 22, months: "in autumn", cueMonths: [9, 10] },
      },
    },
    {
      ...p,
      key: `${p.key}-h`,
      damageNightC: (p.damageNightC ?? 5) - 2,
      damageDayC: (p.damageDayC ?? 30) + 2,
      maxNightC: 15,
    },
  ];
  it("gives every plant exactly what the rules give it on their own", () => {
    for (const season of seasons) {
      for (const plant of PLANT_LIBRARY) {
        for (const p of [plant, ...variants(plant)]) {
          expect(judgeAll(p, season, T)).toEqual(FIT_CHECKS.map((rule) => rule(p, season, T)));
        }
      }
    }
  });
});
