// The rules' judgements on projected months (cold, heat, warm, humidity, flowering), which
// projected.ts merges with the measured results.
import {
  type Fact,
  type FitThresholds,
  type CheckLevel,
  cyclicOrder,
  hemisphereMonths,
  linesOf,
} from "~/domain/fit/facts";
import type { PlantProfile } from "~/domain/plants/library";
import type { Figure, ProjectedMonth } from "~/domain/projection/project";
import type { SeasonProfile } from "~/domain/season/types";

const round1 = (x: number) => Math.round(x * 10) / 10;
const range = (f: Figure): [number, number] => [round1(f.low), round1(f.high)];

export type Judged = { level: CheckLevel; facts: Fact[]; months: number[]; monthKeys?: string[] };

type Side = {
  name: "cold" | "heat";
  /** −1 for the cold side (lower is worse), +1 for the hot side. */
  sign: -1 | 1;
  extreme: "lowest" | "highest";
  typical: "meanDailyLow" | "meanDailyHigh";
  lines: (p: PlantProfile) => { comfort: number; damage: number };
  fact: (at: Where, f: Figure) => Fact;
};
type Where = {
  line: "damage" | "comfort" | "snap";
  lineC: number;
  months: number[];
  worstMonth: number;
  years: number;
};

const COLD: Side = {
  name: "cold",
  sign: -1,
  extreme: "lowest",
  typical: "meanDailyLow",
  lines: (p) => ({ comfort: linesOf(p).comfortNightC, damage: linesOf(p).damageNightC }),
  fact: (at, f) => ({ kind: "projected-cold", ...at, lowC: round1(f.value), rangeC: range(f) }),
};

const HEAT: Side = {
  name: "heat",
  sign: 1,
  extreme: "highest",
  typical: "meanDailyHigh",
  lines: (p) => ({ comfort: linesOf(p).comfortDayC, damage: linesOf(p).damageDayC }),
  fact: (at, f) => ({ kind: "projected-heat", ...at, highC: round1(f.value), rangeC: range(f) }),
};

/**
 * One side of the temperature range: a projected month whose extreme goes past the damage line, or
 * whose typical day (hot side) or night (cold side) sits past comfort beyond the sensor's margin, or
 * single days or nights past comfort.
 */
function extremes(
  side: Side,
  p: PlantProfile,
  months: ProjectedMonth[],
  years: number,
  t: FitThresholds,
): Judged | null {
  const { comfort, damage } = side.lines(p);
  const { sign, extreme, typical } = side;
  /** Positive when a value lies past a line on this side (colder, or hotter). */
  const past = (value: number, line: number) => sign * (value - line);
  /** A line moved outwards by the sensor's margin. */
  const beyondMargin = (line: number) => line + sign * t.sensorMarginC;
  const judged = months.filter((m) => m.figures[extreme] && m.figures[typical]);
  if (judged.length === 0) return null;
  const extremeOf = (m: ProjectedMonth) => m.figures[extreme]!;
  const typicalOf = (m: ProjectedMonth) => m.figures[typical]!;
  const worst = judged.reduce((a, b) => (past(extremeOf(b).value, extremeOf(a).value) > 0 ? b : a));
  const found = (
    level: CheckLevel,
    line: Where["line"],
    lineC: number,
    hit: ProjectedMonth[],
    at: ProjectedMonth,
    f: Figure,
  ): Judged => ({
    level,
    months: hit.map((m) => m.month),
    facts: [side.fact({ line, lineC, months: cyclicOrder(hit.map((m) => m.month)), worstMonth: at.month, years }, f)],
  });
  const damaged = judged.filter((m) => past(extremeOf(m).value, damage) > 0);
  if (damaged.length > 0) return found("poor", "damage", damage, damaged, worst, extremeOf(worst));
  // A cold (or hot) season: the month's typical night (or day) past comfort, beyond the sensor's margin.
  const season = judged.filter((m) => past(typicalOf(m).value, beyondMargin(comfort)) > 0);
  if (season.length > 0) {
    const most = season.reduce((a, b) => (past(typicalOf(b).value, typicalOf(a).value) > 0 ? b : a));
    const level = past(typicalOf(most).value, (comfort + damage) / 2) > 0 ? "poor" : "care";
    return found(level, "comfort", comfort, season, most, typicalOf(most));
  }
  const single = judged.filter((m) => past(extremeOf(m).value, beyondMargin(comfort)) > 0);
  if (single.length > 0) return found("care", "snap", comfort, single, worst, extremeOf(worst));
  return {
    level: "good",
    months: [],
    facts: [
      {
        kind: "projected-ok",
        side: side.name,
        months: cyclicOrder(judged.map((m) => m.month)),
        valueC: round1(extremeOf(worst).value),
        lineC: comfort,
        years,
      },
    ],
  };
}

/** Cold side: a projected month whose lowest falls past the damage line, or whose nights typically sit under comfort. */
export const cold = (p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds) =>
  extremes(COLD, p, months, years, t);

/** Hot side, as for the cold. */
export const heat = (p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds) =>
  extremes(HEAT, p, months, years, t);

/** Warm nights for cool growers: months whose typical night stays 2 °C or more above the group's maximum night. */
export function warm(p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds): Judged | null {
  const { maxNightC } = linesOf(p);
  if (maxNightC === undefined) return null;
  const withLow = months.filter((m) => m.figures.meanDailyLow);
  if (withLow.length === 0) return null;
  const warmMonths = withLow.filter((m) => m.figures.meanDailyLow!.value > maxNightC + t.sensorMarginC);
  if (warmMonths.length === 0) return { level: "good", months: [], facts: [] };
  const warmest = warmMonths.reduce((a, b) => (b.figures.meanDailyLow!.value > a.figures.meanDailyLow!.value ? b : a));
  const typical = warmest.figures.meanDailyLow!;
  return {
    level: typical.value >= maxNightC + 2 ? "poor" : "care",
    months: warmMonths.map((m) => m.month),
    facts: [
      {
        kind: "projected-warm-nights",
        maxNightC,
        months: cyclicOrder(warmMonths.map((m) => m.month)),
        worstMonth: warmest.month,
        lowC: round1(typical.value),
        rangeC: range(typical),
        years,
      },
    ],
  };
}

/** Humidity by the month's mean: dry or damp months ask for care (never worse, as for measured air). */
export function humidity(p: PlantProfile, months: ProjectedMonth[], years: number): Judged | null {
  const withRh = months.filter((m) => m.figures.humidityMean);
  if (withRh.length === 0) return null;
  const dry = withRh.filter((m) => m.figures.humidityMean!.value < p.humidityMin);
  const damp = withRh.filter((m) => m.figures.humidityMean!.value > p.humidityMax);
  const facts: Fact[] = [];
  if (dry.length) {
    const driest = dry.reduce((a, b) => (b.figures.humidityMean!.value < a.figures.humidityMean!.value ? b : a));
    facts.push({
      kind: "projected-humidity",
      side: "dry",
      limitPct: p.humidityMin,
      months: cyclicOrder(dry.map((m) => m.month)),
      worstMonth: driest.month,
      meanPct: Math.round(driest.figures.humidityMean!.value),
      years,
    });
  }
  if (damp.length) {
    const dampest = damp.reduce((a, b) => (b.figures.humidityMean!.value > a.figures.humidityMean!.value ? b : a));
    facts.push({
      kind: "projected-humidity",
      side: "damp",
      limitPct: p.humidityMax,
      months: cyclicOrder(damp.map((m) => m.month)),
      worstMonth: dampest.month,
      meanPct: Math.round(dampest.figures.humidityMean!.value),
      years,
    });
  }
  return facts.length
    ? { level: "care", months: [...dry, ...damp].map((m) => m.month), facts }
    : { level: "good", months: [], facts: [] };
}

/**
 * The flowering cue on projected months: a cool period is likely met when enough months in its
 * season (one per four weeks needed) typically stay under its lines; a day–night difference when a
 * month's typical high minus its typical low reaches it. Only ever good here, and only when every
 * cue the group has is likely met: otherwise the measured judgement stands.
 */
export function flowering(
  p: PlantProfile,
  months: ProjectedMonth[],
  years: number,
  season: SeasonProfile,
  t: FitThresholds,
): Judged | null {
  const cool = p.flowering.coolPeriod;
  const facts: Fact[] = [];
  const met: number[] = [];
  if (cool) {
    const cue = cool.cueMonths ? hemisphereMonths(cool.cueMonths, season) : null;
    const ok = months.filter((m) => {
      const low = m.figures.meanDailyLow?.value;
      const high = m.figures.meanDailyHigh?.value;
      if (low === undefined || high === undefined) return false;
      if (cue && !cue.includes(m.month)) return false;
      return (
        (cool.maxNightC === undefined || low <= cool.maxNightC) && (cool.maxDayC === undefined || high <= cool.maxDayC)
      );
    });
    if (ok.length >= Math.max(1, Math.ceil(cool.weeks / 4))) {
      facts.push({ kind: "projected-cue", cue: "cool", months: cyclicOrder(ok.map((m) => m.month)), years });
      met.push(...ok.map((m) => m.month));
    }
  }
  const need = p.flowering.difC;
  if (need !== undefined) {
    const ok = months.filter(
      (m) =>
        m.figures.meanDailyHigh &&
        m.figures.meanDailyLow &&
        m.figures.meanDailyHigh.value - m.figures.meanDailyLow.value >= need - t.sensorMarginC,
    );
    if (ok.length) {
      facts.push({ kind: "projected-cue", cue: "dif", months: cyclicOrder(ok.map((m) => m.month)), years });
      met.push(...ok.map((m) => m.month));
    }
  }
  // Good only when every cue the group has is likely met; otherwise the measured judgement stands.
  const cues = (cool ? 1 : 0) + (need !== undefined ? 1 : 0);
  return cues > 0 && facts.length === cues ? { level: "good", months: met, facts } : null;
}
