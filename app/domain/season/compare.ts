// Comparing spots season by season: each season of the year (all its months in the chosen period
// together), and the plain sentences that pick out the warmest and coolest spot in each.
import { mean, sum } from "simple-statistics";
import type { Hemisphere, SeasonName } from "~/domain/season/types";

export type CompareMonth = {
  month: number;
  temperature: {
    lowest: number | null;
    highest: number | null;
    meanDailyLow: number | null;
    meanDailyHigh: number | null;
    meanDayNightDifference: number | null;
  };
  humidity: { mean: number | null };
  below: { thresholdC: number; hours: number }[];
  condensationHours: number;
  coverage: { enough: boolean };
};

export type SeasonFigures = {
  season: SeasonName;
  /** Months of the season with enough readings, of 3. */
  monthsCovered: number;
  lowest: number | null;
  highest: number | null;
  meanDailyLow: number | null;
  meanDailyHigh: number | null;
  meanDayNightDifference: number | null;
  meanHumidity: number | null;
  hoursBelow10: number;
  condensationHours: number;
};

export const SEASON_MONTHS: Record<Hemisphere, Record<SeasonName, number[]>> = {
  northern: { winter: [12, 1, 2], spring: [3, 4, 5], summer: [6, 7, 8], autumn: [9, 10, 11] },
  southern: { summer: [12, 1, 2], autumn: [3, 4, 5], winter: [6, 7, 8], spring: [9, 10, 11] },
};
export const SEASON_ORDER: SeasonName[] = ["winter", "spring", "summer", "autumn"];

const present = (xs: (number | null)[]) => xs.filter((x): x is number => x != null);

/**
 * Figures per season of the year from month-of-year profiles. Only months with enough readings
 * count (the rest would hide a cold spell in a gap); means are of the monthly means, each month
 * weighing the same.
 */
export function seasonsOfYear(months: CompareMonth[], hemisphere: Hemisphere): SeasonFigures[] {
  return SEASON_ORDER.map((season) => {
    const ms = months.filter((m) => SEASON_MONTHS[hemisphere][season].includes(m.month) && m.coverage.enough);
    const pick = (f: (m: CompareMonth) => number | null) => present(ms.map(f));
    const lows = pick((m) => m.temperature.lowest);
    const highs = pick((m) => m.temperature.highest);
    const avg = (xs: number[]) => (xs.length ? mean(xs) : null);
    return {
      season,
      monthsCovered: ms.length,
      lowest: lows.length ? Math.min(...lows) : null,
      highest: highs.length ? Math.max(...highs) : null,
      meanDailyLow: avg(pick((m) => m.temperature.meanDailyLow)),
      meanDailyHigh: avg(pick((m) => m.temperature.meanDailyHigh)),
      meanDayNightDifference: avg(pick((m) => m.temperature.meanDayNightDifference)),
      meanHumidity: avg(pick((m) => m.humidity.mean)),
      hoursBelow10: sum(ms.map((m) => m.below.find((b) => b.thresholdC === 10)?.hours ?? 0)),
      condensationHours: sum(ms.map((m) => m.condensationHours)),
    };
  });
}

/**
 * Accuracy of one cheap temperature sensor, ±0.5 °C (common practice: what the usual hobby sensors,
 * e.g. the DHT22 and the SHT3x/BME280 families, state on their data sheets at room temperature). Two
 * spots measured by two such sensors can read up to twice that apart with no real difference.
 */
export const SENSOR_ACCURACY_C = 0.5;
export const SAME_WITHIN_C = 2 * SENSOR_ACCURACY_C;

export type Headline = {
  season: SeasonName;
  kind: "warmest" | "coldest" | "coolest" | "hottest";
  spot: string;
  figure: number;
  by: "meanDailyLow" | "meanDailyHigh";
  /** Other spots whose figure is within SAME_WITHIN_C of this one: no sensor pair can tell them apart. */
  sameAs: { spot: string; figure: number }[];
  /** Every compared spot is within SAME_WITHIN_C of the pick: the season has no winner. */
  allSame: boolean;
};

/**
 * What a grower asks first: which spot is warmest in winter (by its mean daily low, what decides
 * whether warm growers cope) and which is coolest in summer (by its mean daily high, what decides
 * whether cool growers cope); with three or more spots also the coldest in winter and the hottest in
 * summer. A season is judged only when every compared spot has at least two of its months. Spots
 * closer than the sensors can tell apart are named together as about the same, never as a winner;
 * when all are, the season gets that one sentence.
 */
export function compareHeadlines(spots: { name: string; seasons: SeasonFigures[] }[]): Headline[] {
  if (spots.length < 2) return [];
  const asks: { season: SeasonName; kind: Headline["kind"]; by: Headline["by"]; sign: 1 | -1 }[] = [
    { season: "winter", kind: "warmest", by: "meanDailyLow", sign: 1 },
    ...(spots.length > 2
      ? [{ season: "winter" as const, kind: "coldest" as const, by: "meanDailyLow" as const, sign: -1 as const }]
      : []),
    { season: "summer", kind: "coolest", by: "meanDailyHigh", sign: -1 },
    ...(spots.length > 2
      ? [{ season: "summer" as const, kind: "hottest" as const, by: "meanDailyHigh" as const, sign: 1 as const }]
      : []),
  ];
  const out: Headline[] = [];
  for (const ask of asks) {
    const rows = spots.map((s) => ({ name: s.name, f: s.seasons.find((x) => x.season === ask.season)! }));
    if (rows.some((r) => r.f.monthsCovered < 2 || r.f[ask.by] == null)) continue;
    const pick = rows.reduce((a, b) => (ask.sign * (b.f[ask.by]! - a.f[ask.by]!) > 0 ? b : a));
    const figure = pick.f[ask.by]!;
    const sameAs = rows
      .filter((r) => r !== pick && Math.abs(r.f[ask.by]! - figure) < SAME_WITHIN_C)
      .map((r) => ({ spot: r.name, figure: r.f[ask.by]! }));
    const allSame = sameAs.length === rows.length - 1;
    if (allSame && out.some((h) => h.season === ask.season && h.allSame)) continue;
    out.push({ season: ask.season, kind: ask.kind, spot: pick.name, figure, by: ask.by, sameAs, allSame });
  }
  return out;
}

/** The headline as the grower reads it; `temp` formats a temperature in their unit. */
export function describeHeadline(h: Headline, temp: (c: number) => string, deltaTemp: (c: number) => string): string {
  const what = h.by === "meanDailyLow" ? "nights average" : "days average";
  const caveat = `within what two sensors of ±${deltaTemp(SENSOR_ACCURACY_C)} each can tell apart`;
  // Spot names as the grower gave them: no article of ours in front ("The Bench B").
  if (h.sameAs.length === 0) return `${h.spot} is the ${h.kind} in ${h.season} (${what} ${temp(h.figure)}).`;
  const all = [{ spot: h.spot, figure: h.figure }, ...h.sameAs];
  const names = listWords(all.map((x) => x.spot));
  const figures = listWords(all.map((x) => temp(x.figure)));
  if (h.allSame) return `${names} are about the same in ${h.season} (${what} ${figures}): the difference is ${caveat}.`;
  return `${names} are the ${h.kind} in ${h.season}, about the same as each other (${what} ${figures}, ${caveat}).`;
}

function listWords(xs: string[]) {
  return xs.length <= 1 ? (xs[0] ?? "") : `${xs.slice(0, -1).join(", ")} and ${xs[xs.length - 1]}`;
}
