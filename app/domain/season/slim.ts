// What a page gets of a season profile: the figures its tables show, without the days and nights
// behind them. Shared by the loaders that send it and the components that draw it.
import type { SeasonProfile } from "~/domain/season/types";

/** The figures a page needs from a season profile, without the per-day detail. */
export function slimProfile(season: SeasonProfile) {
  return {
    hemisphere: season.hemisphere,
    luxPerPpfd: season.luxPerPpfd,
    luxClipped: season.luxClipped,
    year: season.year.map(
      ({ key, month, name, temperature, humidity, below, condensationHours, light, luxClipped, coverage }) => ({
        key,
        month,
        name,
        temperature,
        humidity,
        below,
        condensationHours,
        light,
        luxClipped,
        coverage,
      }),
    ),
    seasons: season.seasons.map(
      ({ key, label, season: name, temperature, humidity, below, condensationHours, light, luxClipped, coverage }) => ({
        key,
        label,
        season: name,
        temperature,
        humidity,
        below,
        condensationHours,
        light,
        luxClipped,
        coverage,
      }),
    ),
  };
}
export type SlimProfile = ReturnType<typeof slimProfile>;

/** Calendar months of the period (for a period shorter or longer than a year), same figures as the year. */
export function slimMonths(season: SeasonProfile) {
  return season.months.map(
    ({ key, year, month, temperature, humidity, below, condensationHours, light, coverage }) => ({
      key,
      year,
      month,
      temperature,
      humidity,
      below,
      condensationHours,
      light,
      coverage,
    }),
  );
}
