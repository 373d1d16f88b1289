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

/** Cold side: a projected month whose lowest falls past the damage line, or whose nights typically sit under comfort. */
export function cold(p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds): Judged | null {
  const { comfortNightC: comfort, damageNightC: damage } = linesOf(p);
  const withLow = months.filter((m) => m.figures.lowest && m.figures.meanDailyLow);
  if (withLow.length === 0) return null;
  const worst = withLow.reduce((a, b) => (b.figures.lowest!.value < a.figures.lowest!.value ? b : a));
  const damaged = withLow.filter((m) => m.figures.lowest!.value < damage);
  if (damaged.length > 0) {
    const low = worst.figures.lowest!;
    return {
      level: "poor",
      months: damaged.map((m) => m.month),
      facts: [
        {
          kind: "projected-cold",
          line: "damage",
          lineC: damage,
          months: cyclicOrder(damaged.map((m) => m.month)),
          worstMonth: worst.month,
          lowC: round1(low.value),
          rangeC: range(low),
          years,
        },
      ],
    };
  }
  // A cold season: the month's typical night (mean daily low) under comfort, beyond the sensor's margin.
  const season = withLow.filter((m) => m.figures.meanDailyLow!.value < comfort - t.sensorMarginC);
  if (season.length > 0) {
    const coldest = season.reduce((a, b) => (b.figures.meanDailyLow!.value < a.figures.meanDailyLow!.value ? b : a));
    const typical = coldest.figures.meanDailyLow!;
    return {
      level: typical.value < (comfort + damage) / 2 ? "poor" : "care",
      months: season.map((m) => m.month),
      facts: [
        {
          kind: "projected-cold",
          line: "comfort",
          lineC: comfort,
          months: cyclicOrder(season.map((m) => m.month)),
          worstMonth: coldest.month,
          lowC: round1(typical.value),
          rangeC: range(typical),
          years,
        },
      ],
    };
  }
  const nightsUnder = withLow.filter((m) => m.figures.lowest!.value < comfort - t.sensorMarginC);
  if (nightsUnder.length > 0) {
    const low = worst.figures.lowest!;
    return {
      level: "care",
      months: nightsUnder.map((m) => m.month),
      facts: [
        {
          kind: "projected-cold",
          line: "snap",
          lineC: comfort,
          months: cyclicOrder(nightsUnder.map((m) => m.month)),
          worstMonth: worst.month,
          lowC: round1(low.value),
          rangeC: range(low),
          years,
        },
      ],
    };
  }
  return {
    level: "good",
    months: [],
    facts: [
      {
        kind: "projected-ok",
        side: "cold",
        months: cyclicOrder(withLow.map((m) => m.month)),
        valueC: round1(worst.figures.lowest!.value),
        lineC: comfort,
        years,
      },
    ],
  };
}

/** Hot side, as for the cold. */
export function heat(p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds): Judged | null {
  const { comfortDayC: comfort, damageDayC: damage } = linesOf(p);
  const withHigh = months.filter((m) => m.figures.highest && m.figures.meanDailyHigh);
  if (withHigh.length === 0) return null;
  const worst = withHigh.reduce((a, b) => (b.figures.highest!.value > a.figures.highest!.value ? b : a));
  const damaged = withHigh.filter((m) => m.figures.highest!.value > damage);
  if (damaged.length > 0) {
    const high = worst.figures.highest!;
    return {
      level: "poor",
      months: damaged.map((m) => m.month),
      facts: [
        {
          kind: "projected-heat",
          line: "damage",
          lineC: damage,
          months: cyclicOrder(damaged.map((m) => m.month)),
          worstMonth: worst.month,
          highC: round1(high.value),
          rangeC: range(high),
          years,
        },
      ],
    };
  }
  const season = withHigh.filter((m) => m.figures.meanDailyHigh!.value > comfort + t.sensorMarginC);
  if (season.length > 0) {
    const hottest = season.reduce((a, b) => (b.figures.meanDailyHigh!.value > a.figures.meanDailyHigh!.value ? b : a));
    const typical = hottest.figures.meanDailyHigh!;
    return {
      level: typical.value > (comfort + damage) / 2 ? "poor" : "care",
      months: season.map((m) => m.month),
      facts: [
        {
          kind: "projected-heat",
          line: "comfort",
          lineC: comfort,
          months: cyclicOrder(season.map((m) => m.month)),
          worstMonth: hottest.month,
          highC: round1(typical.value),
          rangeC: range(typical),
          years,
        },
      ],
    };
  }
  const daysOver = withHigh.filter((m) => m.figures.highest!.value > comfort + t.sensorMarginC);
  if (daysOver.length > 0) {
    const high = worst.figures.highest!;
    return {
      level: "care",
      months: daysOver.map((m) => m.month),
      facts: [
        {
          kind: "projected-heat",
          line: "snap",
          lineC: comfort,
          months: cyclicOrder(daysOver.map((m) => m.month)),
          worstMonth: worst.month,
          highC: round1(high.value),
          rangeC: range(high),
          years,
        },
      ],
    };
  }
  return {
    level: "good",
    months: [],
    facts: [
      {
        kind: "projected-ok",
        side: "heat",
        months: cyclicOrder(withHigh.map((m) => m.month)),
        valueC: round1(worst.figures.highest!.value),
        lineC: comfort,
        years,
      },
    ],
  };
}

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
