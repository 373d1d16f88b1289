// The fit's temperature checks: cold nights, warm nights (for cool growers) and hot days, each
// against the group's comfort line and damage line, by nights or days, degree-hours, and whether
// it is a brief snap or a season of weeks.
import {
  cyclicOrder,
  linesOf,
  median,
  monthKeys,
  round1,
  unknown,
  type Episode,
  type FitCheck,
} from "~/domain/fit/facts";
import type { NightSummary, SeasonProfile } from "~/domain/season/types";

/** The most items (by day number) in any window of `width` days. */
function densestWindow(dayNumbers: number[], width: number): number {
  let best = 0;
  for (let i = 0, j = 0; i < dayNumbers.length; i++) {
    while (dayNumbers[i] - dayNumbers[j] >= width) j++;
    best = Math.max(best, i - j + 1);
  }
  return best;
}

const hoursUnder = (temps: number[] | undefined, line: number) => (temps ?? []).filter((t) => t < line).length;
const degreeHoursUnder = (temps: number[] | undefined, line: number, low: number) =>
  temps && temps.length ? temps.reduce((n, t) => n + Math.max(0, line - t), 0) : Math.max(0, line - low);
const hoursOver = (temps: number[] | undefined, line: number) => (temps ?? []).filter((t) => t > line).length;
const degreeHoursOver = (temps: number[] | undefined, line: number, high: number) =>
  temps && temps.length ? temps.reduce((n, t) => n + Math.max(0, t - line), 0) : Math.max(0, high - line);

const worstNights = (nights: NightSummary[], line: number, n = 3): Episode[] =>
  [...nights]
    .sort((a, b) => a.low - b.low || a.dayNumber - b.dayNumber)
    .slice(0, n)
    .map((x) => ({ date: x.key, valueC: round1(x.low), hours: Math.max(1, hoursUnder(x.temps, line)) }));

const lowestCache = new WeakMap<SeasonProfile, number>();
/** The lowest reading of nights and days: a cold snap at 9 in the morning still chills. */
function lowestOf(season: SeasonProfile): number {
  let lowest = lowestCache.get(season);
  if (lowest === undefined) {
    lowest = Infinity;
    for (const n of season.nights) lowest = Math.min(lowest, n.low);
    for (const d of season.days) if (d.low !== null) lowest = Math.min(lowest, d.low);
    lowestCache.set(season, lowest);
  }
  return lowest;
}

/**
 * Nights against the comfort night and the cold damage line. Past damage → poor. Past comfort for a
 * season (many nights within weeks) → care, or poor when the season's typical night sits nearer the
 * damage line than the comfort line. A few nights past comfort (a snap) → care, naming the nights.
 */
export const coldNights: FitCheck = (profile, season, t) => {
  if (season.nights.length === 0) return unknown("cold-nights");
  const { comfortNightC: comfort, damageNightC: damage } = linesOf(profile);
  const lowest = lowestOf(season);
  const cold = season.nights.filter((n) => n.low < comfort - t.sensorMarginC);
  let comfortDh = 0;
  for (const n of cold) comfortDh += degreeHoursUnder(n.temps, comfort, n.low);
  const damaged = season.nights.filter((n) => n.low < damage);
  let damageDh = 0;
  for (const n of damaged) damageDh += degreeHoursUnder(n.temps, damage, n.low);
  const miss = { damage: round1(damageDh), comfort: round1(comfortDh) };
  if (damaged.length > 0) {
    return {
      rule: "cold-nights",
      level: "poor",
      months: monthKeys(damaged.map((n) => n.month)),
      miss,
      facts: [
        {
          kind: "cold-damage",
          damageC: damage,
          nights: damaged.length,
          worst: worstNights(damaged, damage),
          degreeHours: round1(damageDh),
        },
      ],
    };
  }
  if (cold.length === 0)
    return {
      rule: "cold-nights",
      level: "good",
      miss,
      facts: [{ kind: "cold-ok", comfortC: comfort, lowestC: round1(lowest) }],
    };
  const isSeason =
    densestWindow(
      cold.map((n) => n.dayNumber),
      t.seasonWindowDays,
    ) >= t.seasonNights;
  if (!isSeason) {
    return {
      rule: "cold-nights",
      level: "care",
      months: monthKeys(cold.map((n) => n.month)),
      miss,
      facts: [
        {
          kind: "cold-snap",
          comfortC: comfort,
          damageC: damage,
          nights: cold.length,
          worst: worstNights(cold, comfort),
          degreeHours: round1(comfortDh),
        },
      ],
    };
  }
  // The season's months: those with a season's worth of cold nights (pro rata), else all cold months.
  const byMonth = new Map<number, NightSummary[]>();
  for (const n of cold) byMonth.set(n.month, [...(byMonth.get(n.month) ?? []), n]);
  let months = [...byMonth.entries()].filter(([, ns]) => ns.length >= t.seasonNights / 2).map(([m]) => m);
  if (months.length === 0) months = [...byMonth.keys()];
  const typical = median(cold.filter((n) => months.includes(n.month)).map((n) => n.low));
  return {
    rule: "cold-nights",
    level: typical < (comfort + damage) / 2 ? "poor" : "care",
    months: monthKeys(months),
    miss,
    facts: [
      {
        kind: "cold-season",
        comfortC: comfort,
        damageC: damage,
        nights: cold.length,
        months: cyclicOrder(months),
        typicalLowC: round1(typical),
        degreeHours: round1(comfortDh),
      },
    ],
  };
};

/**
 * Warm nights for groups with a maximum night (cool growers): a season of nights above it stops
 * growth or flowering — poor when the season's typical night is 2 °C or more above it, else care.
 */
export const warmNights: FitCheck = (profile, season, t) => {
  const { maxNightC } = linesOf(profile);
  if (maxNightC === undefined) return { rule: "warm-nights", level: "good", facts: [] };
  if (season.nights.length === 0) return unknown("warm-nights");
  const warm = season.nights.filter((n) => n.low > maxNightC + t.sensorMarginC);
  const warmest = Math.max(...season.nights.map((n) => n.low));
  if (warm.length === 0)
    return {
      rule: "warm-nights",
      level: "good",
      facts: [{ kind: "warm-nights-ok", maxNightC, warmestLowC: round1(warmest) }],
    };
  const isSeason =
    densestWindow(
      warm.map((n) => n.dayNumber),
      t.seasonWindowDays,
    ) >= t.seasonNights;
  const typical = median(warm.map((n) => n.low));
  const months = cyclicOrder(warm.map((n) => n.month));
  const comfortDh = warm.reduce((s, n) => s + Math.max(0, n.low - maxNightC) * Math.max(1, n.hoursObserved), 0);
  return {
    rule: "warm-nights",
    level: !isSeason ? "good" : typical >= maxNightC + 2 ? "poor" : "care",
    months: monthKeys(months),
    miss: { damage: 0, comfort: round1(comfortDh) },
    facts: [
      { kind: "warm-nights", maxNightC, nights: warm.length, months, typicalLowC: round1(typical), season: isSeason },
    ],
  };
};

/** Days against the comfortable day and the heat damage line, as for nights. */
export const hotDays: FitCheck = (profile, season, t) => {
  const days = season.days.filter((d) => d.high !== null);
  if (days.length === 0) return unknown("hot-days");
  const { comfortDayC: comfort, damageDayC: damage } = linesOf(profile);
  const costsSpikes = profile.flowering.coolPeriod?.maxDayC !== undefined;
  const highest = Math.max(...days.map((d) => d.high!));
  const hot = days.filter((d) => d.high! > comfort + t.sensorMarginC);
  // Hourly means never exceed the day's high, so only days whose high passed the line are read hour by hour.
  const damaged = days.filter((d) => d.high! > damage && (d.temps?.length ? hoursOver(d.temps, damage) > 0 : true));
  const episodes = (list: typeof days, line: number): Episode[] =>
    [...list]
      .sort((a, b) => b.high! - a.high! || a.dayNumber - b.dayNumber)
      .slice(0, 3)
      .map((d) => ({ date: d.key, valueC: round1(d.high!), hours: Math.max(1, hoursOver(d.temps, line)) }));
  let comfortDh = 0,
    damageDh = 0;
  for (const d of hot) comfortDh += degreeHoursOver(d.temps, comfort, d.high!);
  for (const d of damaged) damageDh += degreeHoursOver(d.temps, damage, d.high!);
  const miss = { damage: round1(damageDh), comfort: round1(comfortDh) };
  if (damaged.length > 0) {
    return {
      rule: "hot-days",
      level: "poor",
      months: monthKeys(damaged.map((d) => d.month)),
      miss,
      facts: [
        {
          kind: "heat-damage",
          damageC: damage,
          days: damaged.length,
          worst: episodes(damaged, damage),
          degreeHours: round1(damageDh),
        },
      ],
    };
  }
  if (hot.length === 0)
    return {
      rule: "hot-days",
      level: "good",
      miss,
      facts: [{ kind: "heat-ok", comfortC: comfort, highestC: round1(highest) }],
    };
  const isSeason =
    densestWindow(
      hot.map((d) => d.dayNumber),
      t.seasonWindowDays,
    ) >= t.seasonNights;
  if (!isSeason) {
    return {
      rule: "hot-days",
      level: "care",
      months: monthKeys(hot.map((d) => d.month)),
      miss,
      facts: [
        {
          kind: "heat-snap",
          comfortC: comfort,
          damageC: damage,
          days: hot.length,
          worst: episodes(hot, comfort),
          degreeHours: round1(comfortDh),
          costsSpikes,
        },
      ],
    };
  }
  const typical = median(hot.map((d) => d.high!));
  const months = cyclicOrder(hot.map((d) => d.month));
  return {
    rule: "hot-days",
    level: typical > (comfort + damage) / 2 ? "poor" : "care",
    months: monthKeys(months),
    miss,
    facts: [
      {
        kind: "heat-season",
        comfortC: comfort,
        damageC: damage,
        days: hot.length,
        months,
        typicalHighC: round1(typical),
        degreeHours: round1(comfortDh),
        costsSpikes,
      },
    ],
  };
};
