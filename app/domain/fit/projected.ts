// The fit rules on projected months (issue 16, part 4): months a spot has not measured yet are
// judged from its projection (domain/projection/project.ts), month by month, against the same
// comfort and damage lines as the measured nights and days. Facts, not sentences (describe.ts
// words them). A projection never rules a plant out with the certainty of a measurement: what
// would be poor on projected months alone is a warning at care level, worded as likely.
import {
  type Fact,
  type FitThresholds,
  type CheckLevel,
  type CheckName,
  type CheckResult,
  cyclicOrder,
  hemisphereMonths,
  linesOf,
  monthKeyOf,
} from "~/domain/fit/facts";
import type { PlantProfile } from "~/domain/plants/library";
import type { Figure, ProjectedMonth } from "~/domain/projection/project";
import type { SeasonProfile } from "~/domain/season/types";

/** What a verdict or one reason rests on: measured months only, projected months only, or both. */
export type Confidence = "measured" | "projected" | "mixed";

/** The projection a fit may fill its unmeasured months from (see fitProjection in .server/projections.ts). */
export type FitProjection = {
  /** The months to fill: those of the judged period without enough measured days (projected or blended). */
  months: ProjectedMonth[];
  /** Past years of weather the projection played through. */
  years: number;
  /** Local date ("YYYY-MM-DD") by which every month will have been measured, if the sensor stays. */
  firmBy: string | null;
};

/** What a verdict rests on: months measured and projected, and when it will be firm. */
export type FitBasis = {
  confidence: Confidence;
  /** Months of the year with enough measured days. */
  measuredMonths: number[];
  /** Months filled from the projection (partly measured months among them: `blendedMonths`). */
  projectedMonths: number[];
  blendedMonths: number[];
  years: number;
  firmBy: string | null;
};

const round1 = (x: number) => Math.round(x * 10) / 10;
const range = (f: Figure): [number, number] => [round1(f.low), round1(f.high)];

type Judged = { level: CheckLevel; facts: Fact[]; months: number[]; monthKeys?: string[] };

/** Cold side: a projected month whose lowest falls past the damage line, or whose nights typically sit under comfort. */
function cold(p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds): Judged | null {
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
function heat(p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds): Judged | null {
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
function warm(p: PlantProfile, months: ProjectedMonth[], years: number, t: FitThresholds): Judged | null {
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
function humidity(p: PlantProfile, months: ProjectedMonth[], years: number): Judged | null {
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
function flowering(
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

const ORDER: CheckLevel[] = ["good", "unknown", "care", "poor"];
const worse = (a: CheckLevel, b: CheckLevel) => (ORDER.indexOf(b) > ORDER.indexOf(a) ? b : a);

/**
 * One rule's measured result merged with its judgement on the projected months. Measured poor
 * stands as it is. A projected finding is capped at care (likely, not certain) and sets the
 * reason's confidence to projected when it is what sets the level; a good reason judged on both
 * measured and projected months is mixed.
 */
function merge(measured: CheckResult, projected: Judged, rule: CheckName): CheckResult {
  const m = measured.noData ? null : measured;
  const pLevel: CheckLevel = projected.level === "poor" ? "care" : projected.level;
  // Month keys in reading order, once per judgement (a fit table merges each judgement many times).
  const own = (projected.monthKeys ??= cyclicOrder(projected.months).map(monthKeyOf));
  if (rule === "flowering") {
    // A cue likely met on projected months lifts a measured miss (or no data) to good.
    if (!m || m.level !== "good")
      return { rule, level: "good", facts: projected.facts, months: own, confidence: "projected" };
    return { ...m, facts: [...m.facts, ...projected.facts], confidence: "mixed" };
  }
  if (!m)
    return {
      rule,
      level: pLevel,
      facts: projected.facts,
      months: own,
      confidence: "projected",
      ...(projected.level === "poor" ? { likely: "poor" as const } : {}),
    };
  const level = worse(m.level, pLevel);
  const confidence: Confidence =
    level === "good" ? "mixed" : ORDER.indexOf(pLevel) > ORDER.indexOf(m.level) ? "projected" : "measured";
  return {
    ...m,
    level,
    // What sets the level comes first: the projected warning before the measured months' all-clear.
    facts:
      confidence === "projected"
        ? [...projected.facts.filter((f) => f.kind !== "projected-ok"), ...m.facts]
        : [...m.facts, ...projected.facts.filter((f) => f.kind !== "projected-ok" || level === "good")],
    months: !m.months?.length
      ? own
      : own.length === 0
        ? m.months
        : cyclicOrder([...m.months.map(Number), ...projected.months]).map(monthKeyOf),
    confidence,
    ...(confidence === "projected" && projected.level === "poor" ? { likely: "poor" as const } : {}),
  };
}

// A fit table judges many plants alike in what a rule reads (fit/checks.ts CHECK_INPUTS): each
// projection's judgement is kept per rule and plant inputs, and each merge per pair of results.
type JudgeKey = (p: PlantProfile) => string;
const JUDGES: {
  rule: CheckName;
  key: JudgeKey;
  judge: (
    p: PlantProfile,
    months: ProjectedMonth[],
    years: number,
    t: FitThresholds,
    season: SeasonProfile,
  ) => Judged | null;
}[] = [
  {
    rule: "cold-nights",
    key: (p) => `${p.minNightC}|${linesOf(p).damageNightC}`,
    judge: (p, m, y, t) => cold(p, m, y, t),
  },
  { rule: "hot-days", key: (p) => `${p.maxDayC}|${linesOf(p).damageDayC}`, judge: (p, m, y, t) => heat(p, m, y, t) },
  { rule: "warm-nights", key: (p) => `${p.maxNightC}`, judge: (p, m, y, t) => warm(p, m, y, t) },
  { rule: "humidity", key: (p) => `${p.humidityMin}|${p.humidityMax}`, judge: (p, m, y) => humidity(p, m, y) },
  { rule: "flowering", key: (p) => JSON.stringify(p.flowering), judge: (p, m, y, t, s) => flowering(p, m, y, s, t) },
];
const judgedCache = new WeakMap<FitProjection, WeakMap<FitThresholds, Map<string, Judged | null>>>();
const mergedCache = new WeakMap<CheckResult, Map<Judged, CheckResult>>();
/** Each plant's key per judge, built once per plant profile. */
const plantKeys = new WeakMap<PlantProfile, string[]>();

/** Each measured rule result joined with the projected months' judgement of the same rule. */
export function withProjection(
  profile: PlantProfile,
  season: SeasonProfile,
  reasons: CheckResult[],
  projection: FitProjection,
  t: FitThresholds,
): CheckResult[] {
  let byT = judgedCache.get(projection);
  if (!byT) judgedCache.set(projection, (byT = new WeakMap()));
  let known = byT.get(t);
  if (!known) byT.set(t, (known = new Map()));
  let keys = plantKeys.get(profile);
  if (!keys) plantKeys.set(profile, (keys = JUDGES.map((j) => `${j.rule}|${j.key(profile)}`)));
  return reasons.map((r) => {
    const i = JUDGES.findIndex((x) => x.rule === r.rule);
    if (i < 0) return r; // not judged on projected months: rests on the measured months (confidence absent = measured)
    const j = JUDGES[i];
    const key = keys[i];
    let judged = known.get(key);
    if (judged === undefined)
      known.set(key, (judged = j.judge(profile, projection.months, projection.years, t, season)));
    if (!judged || (r.level === "poor" && !r.noData)) return r;
    let merges = mergedCache.get(r);
    if (!merges) mergedCache.set(r, (merges = new Map()));
    let out = merges.get(judged);
    if (!out) merges.set(judged, (out = merge(r, judged, r.rule)));
    return out;
  });
}

/** What the verdict rests on. Null when nothing was filled from a projection. */
export function basisOf(season: SeasonProfile, projection: FitProjection | undefined): FitBasis | null {
  if (!projection || projection.months.length === 0) return null;
  const measuredMonths = season.year.filter((m) => m.coverage.enough).map((m) => m.month);
  return {
    confidence: measuredMonths.length === 0 ? "projected" : "mixed",
    measuredMonths,
    projectedMonths: projection.months.map((m) => m.month),
    blendedMonths: projection.months.filter((m) => m.source === "blended").map((m) => m.month),
    years: projection.years,
    firmBy: projection.firmBy,
  };
}
