// A spot's projected year: its response model fitted on its latest weeks against the stored
// outdoor weather, played through the site's past years, merged with what was measured. Cached per
// spot and refitted daily, or sooner when a day's worth of new hours or new weather has come in.
// Reads only what is stored: a site whose weather is not fetched yet gets `weather-not-fetched`.
import { pool } from "~/.server/db";
import { loadRollups } from "~/.server/rollups/read";
import { weatherStatus, loadHours, type WeatherStatus } from "~/.server/weather/store";
import type { SpotFacing } from "~/domain/vocabulary";
import { combineMonths } from "~/domain/projection/combine";
import { projectYear, type ProjectedMonth } from "~/domain/projection/project";
import { forecastSpot, type ForecastHour, type ForecastNight } from "~/domain/projection/forecast";
import { drivers, type Place } from "~/domain/projection/drivers";
import { fitResponse, type ModelQuality, type ResponseModel } from "~/domain/projection/response";
import { dateOfDayNumber, zoneClock } from "~/domain/season/local-time";
import { DEFAULT_THRESHOLDS_C, MIN_DAYS_FOR_MONTH } from "~/domain/season/thresholds";
import { seasonProfile } from "~/domain/season/profile";
import type { SeasonProfile } from "~/domain/season/types";
import type { FitProjection } from "~/domain/fit/projected";

const HOUR = 3_600_000;
const DAY = 86_400_000;
const FIT_DAYS = 28;
const REFIT_AFTER_MS = DAY;
const REFIT_AFTER_HOURS = 24;
const FORECAST_DAYS = 16;
const CACHE_SPOTS = 500;

export type ProjectedProfile = {
  spotId: number;
  weather: WeatherStatus;
  /** Why there is no projection yet, if there is none. */
  missing: "weather-not-fetched" | "too-few-days" | "no-past-years" | null;
  model: {
    fittedAt: Date;
    /** The span of readings fitted on. */
    from: Date;
    to: Date;
    hoursFitted: number;
    quality: ModelQuality | null;
    heatingFloor: boolean;
    coolingCeiling: boolean;
  } | null;
  /** Past calendar years of weather played through. */
  years: number[];
  /** January to December: measured, projected or blended, each figure with its 80 % interval. */
  months: ProjectedMonth[];
  /** When every month will have been measured, if the sensor stays (the date of a firm answer). */
  firmBy: Date | null;
};

type Cached = {
  profile: ProjectedProfile;
  model: ResponseModel;
  place: { siteId: number; timeZone: string } & Place;
  indoor: boolean;
  hours: number;
  weatherKey: string;
};
const cache = new Map<number, Cached>();
const tooFew = new Map<number, { at: number; hours: number; weatherKey: string }>();

/** Thresholds for "hours below": the season profile's defaults unless the caller names its own. */
export async function projectedProfile(
  spotId: number,
  opts: { now?: Date; thresholds?: number[]; years?: number } = {},
): Promise<ProjectedProfile | null> {
  const now = opts.now ?? new Date();
  const spotRes = await pool().query<{
    id: number;
    indoor: boolean;
    facing: SpotFacing;
    site_id: number;
    latitude: number;
    longitude: number;
    time_zone: string;
  }>(
    `SELECT sp.id, sp.indoor, sp.facing, s.id AS site_id, ` +
      `s.latitude, s.longitude, s.time_zone FROM spots sp JOIN sites s ` +
      `ON s.id = sp.site_id WHERE sp.id = $1`,
    [spotId],
  );
  const spot = spotRes.rows[0];
  if (!spot) return null;
  const site = { latitude: spot.latitude, longitude: spot.longitude, timeZone: spot.time_zone };
  const weather = await weatherStatus(spot.site_id);
  const empty = (missing: ProjectedProfile["missing"]): ProjectedProfile => ({
    spotId,
    weather,
    missing,
    model: null,
    years: [],
    months: [],
    firmBy: null,
  });
  if (weather.state !== "ready") return empty("weather-not-fetched");

  const yearAgo = new Date(now.getTime() - 365 * DAY);
  const rollups = (await loadRollups([spotId], yearAgo, now)).get(spotId) ?? [];
  const hours = rollups.reduce((n, r) => n + (r.tN > 0 ? 1 : 0), 0);
  const weatherKey =
    `${weather.archiveFrom}:${weather.archiveTo}:` +
    `${weather.forecastAt?.getTime()}:${site.latitude}:` +
    `${site.longitude}:${opts.thresholds?.join(",") ?? ""}`;
  const hit = cache.get(spotId);
  if (
    hit &&
    hit.profile.model &&
    now.getTime() - hit.profile.model.fittedAt.getTime() < REFIT_AFTER_MS &&
    hours - hit.hours < REFIT_AFTER_HOURS &&
    hit.weatherKey === weatherKey
  ) {
    return hit.profile;
  }

  // A spot too new for a model is not refitted (nor ten years of weather read) until its hours grow.
  const miss = tooFew.get(spotId);
  if (miss && miss.hours === hours && miss.weatherKey === weatherKey && now.getTime() - miss.at < REFIT_AFTER_MS)
    return empty("too-few-days");

  const thisYear = new Date(now.getTime()).getUTCFullYear();
  const wantYears = opts.years ?? 10;
  const weatherFrom = new Date(Date.UTC(thisYear - wantYears, 0, 1) - 14 * DAY);
  const hoursOut = await loadHours(spot.site_id, weatherFrom, new Date(now.getTime() + FORECAST_DAYS * DAY));
  const d = drivers(hoursOut, site.timeZone, { ...site, facing: spot.indoor ? spot.facing : "none" });

  // Past calendar years the archive covers almost whole.
  const years: number[] = [];
  for (let y = thisYear - wantYears; y < thisYear; y++) {
    const i0 = (Date.UTC(y, 0, 1) - hoursOut.start) / HOUR;
    const i1 = (Date.UTC(y + 1, 0, 1) - hoursOut.start) / HOUR;
    if (i0 < 0 || i1 > hoursOut.temperature.length) continue;
    let missing = 0;
    for (let i = i0; i < i1; i++) if (Number.isNaN(hoursOut.temperature[i])) missing++;
    if (missing < 0.02 * (i1 - i0)) years.push(y);
  }

  const measured = seasonProfile(rollups, site, {
    from: yearAgo,
    to: now,
    thresholds: opts.thresholds ?? DEFAULT_THRESHOLDS_C,
  });
  const fitFrom = now.getTime() - FIT_DAYS * DAY;
  const fitRollups = rollups.filter((r) => r.hour.getTime() >= fitFrom);
  const model = fitResponse(fitRollups, d, {
    indoor: spot.indoor,
    timeZone: site.timeZone,
    place: { ...site, facing: spot.indoor ? spot.facing : "none" },
  });
  if (!model) {
    if (tooFew.size >= CACHE_SPOTS) tooFew.delete(tooFew.keys().next().value!);
    tooFew.set(spotId, { at: now.getTime(), hours, weatherKey });
    return empty("too-few-days");
  }
  tooFew.delete(spotId);
  if (years.length === 0) return { ...empty("no-past-years"), weather };

  const projected = projectYear(model, d, site, { years, thresholds: opts.thresholds, seed: spotId });
  const months = combineMonths(projected, measured.year);
  const profile: ProjectedProfile = {
    spotId,
    weather,
    missing: null,
    model: {
      fittedAt: now,
      from: fitRollups[0]?.hour ?? new Date(fitFrom),
      to: fitRollups[fitRollups.length - 1]?.hour ?? now,
      hoursFitted: model.hoursFitted,
      quality: model.quality,
      heatingFloor: model.floor !== null,
      coolingCeiling: model.ceiling !== null,
    },
    years,
    months,
    firmBy: firmBy(months, now, site.timeZone),
  };
  if (cache.size >= CACHE_SPOTS) cache.delete(cache.keys().next().value!);
  cache.set(spotId, {
    profile,
    model,
    place: { siteId: spot.site_id, ...site, facing: spot.indoor ? spot.facing : "none" },
    indoor: spot.indoor,
    hours,
    weatherKey,
  });
  return profile;
}

/**
 * The day the last month not yet measured will have MIN_DAYS_FOR_MONTH days, if readings keep
 * coming: that month's next occurrence (this month counts, with the days still left in it).
 */
function firmBy(months: ProjectedMonth[], now: Date, timeZone: string): Date | null {
  const open = months.filter((m) => m.source !== "measured");
  if (open.length === 0) return null;
  const local = dateOfDayNumber(zoneClock(timeZone).localDayNumber(now.getTime()));
  const { year, month } = local;
  let latest = 0;
  for (const m of open) {
    const needed = MIN_DAYS_FOR_MONTH - (m.month === month ? m.measuredDays : 0);
    let y = year;
    if (m.month < month || (m.month === month && local.day + needed - 1 > m.daysInMonth)) y++;
    const day = m.month === month && y === year ? local.day + needed - 1 : MIN_DAYS_FOR_MONTH;
    latest = Math.max(latest, Date.UTC(y, m.month - 1, Math.max(1, day)));
  }
  return new Date(latest);
}

export type SpotForecast = { spotId: number; forecastAt: Date | null; hours: ForecastHour[]; nights: ForecastNight[] };

/**
 * The next `hours` hours at a spot from the stored forecast through its response model, and the
 * nights in them (expected low, its 80 % lower bound, the leaves' likely low on clear still nights
 * outdoors): what a forecast warning needs. Null when the spot has no model yet.
 */
export async function spotForecast(
  spotId: number,
  opts: { now?: Date; hours?: number } = {},
): Promise<SpotForecast | null> {
  const now = opts.now ?? new Date();
  const profile = await projectedProfile(spotId, { now });
  const entry = cache.get(spotId);
  if (!profile?.model || !entry) return null;
  // Ten days before now let the 48-hour smoothing settle.
  const weather = await loadHours(
    entry.place.siteId,
    new Date(now.getTime() - 10 * DAY),
    new Date(now.getTime() + 3 * DAY),
  );
  const d = drivers(weather, entry.place.timeZone, entry.place);
  const { hours, nights } = forecastSpot(entry.model, d, now.getTime(), {
    outdoor: !entry.indoor,
    hours: opts.hours ?? 48,
  });
  return { spotId, forecastAt: profile.weather.state === "ready" ? profile.weather.forecastAt : null, hours, nights };
}

/**
 * What a fit needs from a spot's projection for a judged season: the months of the season without
 * enough measured days that the projection fills (projected, or partly measured and blended),
 * the past years it played through and the local date it will be firm by. Months the projection
 * itself counts as measured are not filled (a judged period other than the latest year). Null when
 * there is no projection (no weather yet, too few days) or nothing to fill.
 */
export async function fitProjection(
  spotId: number,
  season: SeasonProfile,
  opts: { now?: Date } = {},
): Promise<FitProjection | null> {
  const open = new Set(season.year.filter((m) => !m.coverage.enough).map((m) => m.month));
  if (open.size === 0) return null;
  const p = await projectedProfile(spotId, { now: opts.now });
  if (!p || p.missing || p.months.length === 0) return null;
  const months = p.months.filter((m) => open.has(m.month) && m.source !== "measured" && m.years > 0);
  if (months.length === 0) return null;
  return { months, years: p.years.length, firmBy: p.firmBy ? p.firmBy.toISOString().slice(0, 10) : null };
}

/** fitProjection for many spots at once (a fit table: a plant's page, the wishlist): spots without one are left out. */
export async function fitProjections(
  seasons: Map<number, SeasonProfile>,
  opts: { now?: Date } = {},
): Promise<Map<number, FitProjection>> {
  const out = new Map<number, FitProjection>();
  await Promise.all(
    [...seasons].map(async ([spotId, season]) => {
      const p = await fitProjection(spotId, season, opts);
      if (p) out.set(spotId, p);
    }),
  );
  return out;
}

/** Forget a spot's cached projection (its readings were rebuilt, it moved site). */
export function forgetProjection(spotId: number) {
  cache.delete(spotId);
  tooFew.delete(spotId);
}
