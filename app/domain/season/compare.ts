// Comparing spots season by season: each season of the year (all its months in the chosen period
// together), and the plain sentences that pick out the warmest and coolest spot in each.
import { mean, sum } from "simple-statistics";
import type { Hemisphere, SeasonName } from "~/domain/season/types";

export type CompareMonth = {
  month: number;
  temperature: { lowest: number | null; highest: number | null; meanDailyLow: number | null; meanDailyHigh: number | null; meanDayNightDifference: number | null };
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

export type Headline = {
  season: SeasonName;
  kind: "warmest" | "coldest" | "coolest" | "hottest";
  spot: string;
  figure: number;
  by: "meanDailyLow" | "meanDailyHigh";
};

/**
 * What a grower asks first: which spot is warmest in winter (by its mean daily low, what decides
 * whether warm growers cope) and which is coolest in summer (by its mean daily high, what decides
 * whether cool growers cope); with three or more spots also the coldest in winter and the hottest in
 * summer. A season is judged only when every compared spot has at least two of its months.
 */
export function compareHeadlines(spots: { name: string; seasons: SeasonFigures[] }[]): Headline[] {
  if (spots.length < 2) return [];
  const asks: { season: SeasonName; kind: Headline["kind"]; by: Headline["by"]; sign: 1 | -1 }[] = [
    { season: "winter", kind: "warmest", by: "meanDailyLow", sign: 1 },
    ...(spots.length > 2 ? [{ season: "winter" as const, kind: "coldest" as const, by: "meanDailyLow" as const, sign: -1 as const }] : []),
    { season: "summer", kind: "coolest", by: "meanDailyHigh", sign: -1 },
    ...(spots.length > 2 ? [{ season: "summer" as const, kind: "hottest" as const, by: "meanDailyHigh" as const, sign: 1 as const }] : []),
  ];
  const out: Headline[] = [];
  for (const ask of asks) {
    const rows = spots.map((s) => ({ name: s.name, f: s.seasons.find((x) => x.season === ask.season)! }));
    if (rows.some((r) => r.f.monthsCovered < 2 || r.f[ask.by] == null)) continue;
    const pick = rows.reduce((a, b) => (ask.sign * (b.f[ask.by]! - a.f[ask.by]!) > 0 ? b : a));
    out.push({ season: ask.season, kind: ask.kind, spot: pick.name, figure: pick.f[ask.by]!, by: ask.by });
  }
  return out;
}
