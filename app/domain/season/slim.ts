// What a page gets of a season profile: the figures its tables show, without the days and nights
// behind them. Shared by the loaders that send it and the components that draw it.
import type { PeriodStats, SeasonProfile } from "~/domain/season/types";

/** The figures of one month or season that tables and exports show (PeriodStats without the lux ceiling's note). */
export const periodFigures = ({ temperature, humidity, below, condensationHours, light, coverage }: PeriodStats) => ({
  temperature,
  humidity,
  below,
  condensationHours,
  light,
  coverage,
});

/** The figures a page needs from a season profile, without the per-day detail. */
export function slimProfile(season: SeasonProfile) {
  return {
    hemisphere: season.hemisphere,
    luxPerPpfd: season.luxPerPpfd,
    luxClipped: season.luxClipped,
    year: season.year.map((m) => ({
      key: m.key,
      month: m.month,
      name: m.name,
      ...periodFigures(m),
      luxClipped: m.luxClipped,
    })),
    seasons: season.seasons.map((s) => ({
      key: s.key,
      label: s.label,
      season: s.season,
      ...periodFigures(s),
      luxClipped: s.luxClipped,
    })),
  };
}
export type SlimProfile = ReturnType<typeof slimProfile>;

/** Calendar months of the period (for a period shorter or longer than a year), same figures as the year. */
export function slimMonths(season: SeasonProfile) {
  return season.months.map((m) => ({ key: m.key, year: m.year, month: m.month, ...periodFigures(m) }));
}
