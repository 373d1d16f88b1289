// The fit on measured + projected months (issue 16, part 4), on synthetic seasons (season-fixture)
// and hand-made projected months: verdicts carry their confidence, a projection alone never says
// "struggles here", and measured months always win over projected ones.
import { describe, expect, it } from "vitest";
import { describeReason, describeVerdict } from "~/domain/fit/describe";
import type { FitProjection } from "~/domain/fit/projected";
import { spotYear, steadyRoom } from "~/domain/fit/season-fixture";
import { fitPlant, rankPlantsForSpot } from "~/domain/fit/verdict";
import { PLANT_LIBRARY, plantByKey } from "~/domain/plants/library";
import type { Figure, ProjectedMonth } from "~/domain/projection/project";

const phal = plantByKey("phalaenopsis")!;

const fig = (value: number, spread = 1.5): Figure => ({ value, low: value - spread, high: value + spread });
/** A projected month: typical night and day, the month's lowest and highest, mean humidity. */
function projected(
  month: number,
  t: { night: number; day: number; lowest?: number; highest?: number; rh?: number },
  source: ProjectedMonth["source"] = "projected",
): ProjectedMonth {
  return {
    month,
    source,
    measuredDays: source === "blended" ? 8 : 0,
    daysInMonth: 30,
    years: 10,
    figures: {
      meanDailyLow: fig(t.night),
      meanDailyHigh: fig(t.day),
      lowest: fig(t.lowest ?? t.night - 1, 2),
      highest: fig(t.highest ?? t.day + 1, 2),
      p05: fig(t.night),
      p95: fig(t.day),
      meanDayNightDifference: fig(t.day - t.night),
      humidityMean: fig(t.rh ?? 60, 5),
      humidityLowest: fig((t.rh ?? 60) - 10, 5),
      humidityHighest: fig((t.rh ?? 60) + 10, 5),
      below: [],
    },
  };
}

// A heated room (18/24 °C, 60 %) at a north window, no light sensor, measured through November
// only and a few days of December.
const northWindow = { window: { latitude: 51.5, facing: "N" as const, indoor: true } };
const novemberOnly = spotYear({ month: steadyRoom, observed: [11, 12], keepDay: (m, d) => m === 11 || d <= 8 });
const lit = (m: number) => ({ ...steadyRoom(m), lux: 7000 });
const others = [12, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
const warmYear: FitProjection = {
  months: others.map((m) => projected(m, { night: 18, day: 24 }, m === 12 ? "blended" : "projected")),
  years: 10,
  firmBy: "2026-10-20",
};

describe("fit on measured + projected months", () => {
  it("without a projection a month-old spot is 'not enough data yet' (the behaviour before)", () => {
    const fit = fitPlant(phal, novemberOnly);
    expect(fit.verdict).toBe("not enough data yet");
    expect(fit.confidence).toBe("measured");
    expect(fit.basis).toBeNull();
  });

  it("judges the months not measured from the projection: likely thrives, with months measured and the date it is firm", () => {
    // Phalaenopsis: nights above 16 °C, days to 29 °C, 50–80 % (AOS culture sheet, library.ts).
    const fit = fitPlant(phal, novemberOnly, undefined, { ...northWindow, projection: warmYear });
    expect(fit.verdict).toBe("thrives here");
    expect(fit.confidence).toBe("mixed");
    expect(fit.basis).toMatchObject({
      measuredMonths: [11],
      projectedMonths: others,
      blendedMonths: [12],
      years: 10,
      firmBy: "2026-10-20",
    });
    // The months still unmeasured stay listed: the page never hides which months were measured.
    expect(fit.missingMonths).toHaveLength(11);
    const cold = fit.reasons.find((r) => r.rule === "cold-nights")!;
    expect(cold).toMatchObject({ level: "good", confidence: "mixed" });
    expect(describeVerdict(fit, undefined, new Date("2025-12-01T00:00:00Z"))).toBe(
      "likely thrives here — 1 of 12 months measured (December partly), the rest projected from 10 past years of weather; firm by 20 October 2026",
    );
  });

  it("a poor month that rests only on projected months is a likely warning at care, never 'struggles here'", () => {
    // January's lowest projected at 6 °C, under Phalaenopsis' 10 °C damage line (chilling injury
    // under about 10 °C: common practice, library.ts damageNightC).
    const coldJanuary: FitProjection = {
      ...warmYear,
      months: warmYear.months.map((m) => (m.month === 1 ? projected(1, { night: 17, day: 22, lowest: 6 }) : m)),
    };
    const fit = fitPlant(phal, novemberOnly, undefined, { ...northWindow, projection: coldJanuary });
    expect(fit.verdict).not.toBe("struggles here");
    expect(fit.verdict).toBe("possible with care");
    expect(fit.level).toBe("care");
    const cold = fit.reasons.find((r) => r.rule === "cold-nights")!;
    expect(cold).toMatchObject({ level: "care", confidence: "projected", likely: "poor", months: ["01"] });
    expect(describeReason(cold, undefined, "Phalaenopsis")).toMatch(
      /^January is likely to fall to 6 °C here \(80 % range 4 to 8 °C, from 10 past years of weather\), under Phalaenopsis's 10 °C damage line: plan to move it in January\./,
    );
    expect(describeVerdict(fit)).toMatch(/^likely possible with care — 1 of 12 months measured/);
    // Across the whole library: a projected reason is never poor, and "struggles here" only ever
    // rests on a measured poor (a warm room's measured November rules out a cool grower like Masdevallia).
    for (const { fit: f } of rankPlantsForSpot(PLANT_LIBRARY, novemberOnly, undefined, {
      ...northWindow,
      projection: coldJanuary,
    })) {
      for (const r of f.reasons)
        if (r.confidence === "projected") expect(r.level, `${f.plantKey} ${r.rule}`).not.toBe("poor");
      if (f.verdict === "struggles here") {
        expect(f.confidence, f.plantKey).toBe("measured");
        expect(
          f.reasons.some((r) => r.level === "poor" && (r.confidence ?? "measured") === "measured"),
          f.plantKey,
        ).toBe(true);
      }
    }
  });

  it("a cold season on projected months is worded as likely and asks for care", () => {
    const coldWinter: FitProjection = {
      ...warmYear,
      months: warmYear.months.map((m) => ([1, 2].includes(m.month) ? projected(m.month, { night: 12, day: 19 }) : m)),
    };
    const fit = fitPlant(phal, novemberOnly, undefined, { projection: coldWinter });
    const cold = fit.reasons.find((r) => r.rule === "cold-nights")!;
    expect(cold).toMatchObject({ level: "care", confidence: "projected" });
    expect(describeReason(cold, { unit: "F" }, "Phalaenopsis")).toMatch(
      /^Nights from January to February|^Nights in January and February are likely to run under 60.8 °F/,
    );
  });

  it("a flowering cue the measured weeks missed is likely met in projected months in its season", () => {
    // Cymbidium spikes after about 4 weeks of nights at 13 °C or below in late summer–autumn (library.ts:
    // common practice). The warm room's measured November misses it; a projected cool September and October meet it.
    const cymbidium = plantByKey("cymbidium")!;
    const coolAutumn: FitProjection = {
      ...warmYear,
      months: warmYear.months.map((m) => ([9, 10].includes(m.month) ? projected(m.month, { night: 11, day: 20 }) : m)),
    };
    const before = fitPlant(cymbidium, novemberOnly, undefined, { ...northWindow, projection: warmYear }).reasons.find(
      (r) => r.rule === "flowering",
    )!;
    expect(before).toMatchObject({ level: "care" });
    expect(before.confidence ?? "measured").toBe("measured");
    const after = fitPlant(cymbidium, novemberOnly, undefined, { ...northWindow, projection: coolAutumn }).reasons.find(
      (r) => r.rule === "flowering",
    )!;
    expect(after).toMatchObject({ level: "good", confidence: "projected", months: ["09", "10"] });
    expect(describeReason(after, undefined, "Cymbidium")).toBe(
      "The cool spell Cymbidium needs to flower is likely in September and October (projected, from 10 past years of weather).",
    );
  });

  it("measured months always win: a measured January is judged on its readings, not on a colder projection of it", () => {
    // Measured January and November in the warm room; a projection that (wrongly) puts January at 6 °C.
    const measuredJanuary = spotYear({ month: lit, observed: [1, 11] });
    const wrong: FitProjection = {
      months: [1, 2, 3].map((m) => projected(m, { night: 18, day: 23, lowest: m === 1 ? 6 : 17 })),
      years: 10,
      firmBy: "2026-03-20",
    };
    const fit = fitPlant(phal, measuredJanuary, undefined, { projection: wrong });
    expect(fit.basis).toMatchObject({ measuredMonths: [1, 11], projectedMonths: [2, 3] });
    const cold = fit.reasons.find((r) => r.rule === "cold-nights")!;
    expect(cold.level).not.toBe("care");
    expect(cold.facts.some((f) => f.kind === "projected-cold")).toBe(false);
  });

  it("a measured poor stays 'struggles here', resting on the measurement", () => {
    // An unheated porch measured in January at 4 °C nights: under the 10 °C damage line (library.ts).
    const porch = spotYear({ month: (m) => ({ night: m === 1 ? 4 : 18, day: 20, rh: 60 }), observed: [1] });
    const fit = fitPlant(phal, porch, undefined, {
      projection: { months: [2, 3, 4].map((m) => projected(m, { night: 18, day: 24 })), years: 10, firmBy: null },
    });
    expect(fit.verdict).toBe("struggles here");
    expect(fit.confidence).toBe("measured");
    expect(fit.reasons[0]).toMatchObject({ rule: "cold-nights", level: "poor" });
    expect(fit.reasons[0].confidence ?? "measured").toBe("measured"); // absent: measured
    expect(describeVerdict(fit)).toBe("struggles here");
  });
});
