// What a new spot's page can say on day one (issue 16, part 5): the site's outdoor climate by month
// from its stored past weather, the spot's first days against the outdoor weather of the same hours,
// and where its response model stands (waiting for days, or fitted, with the date of a firm answer).
// Reads only what is stored; never waits on the weather service.
import { loadRollups } from "~/.server/rollups/read";
import { projectedProfile } from "~/.server/projections";
import { loadHours, weatherStatus } from "~/.server/weather/store";
import { MIN_DAYS } from "~/domain/projection/response";
import { zoneClock } from "~/domain/season/local-time";

const HOUR = 3_600_000;
const DAY = 86_400_000;
/** The first days compared with outdoors: at most the latest four weeks (a new spot's first weeks). */
const VERSUS_DAYS = 28;
/** Local hours counted as night (00:00–05:59) and as the warm part of the day (11:00–16:59). */
const NIGHT_HOURS = [0, 1, 2, 3, 4, 5];
const DAY_HOURS = [11, 12, 13, 14, 15, 16];

export type ClimateMonth = {
  month: number;
  meanDailyLowC: number;
  meanDailyHighC: number;
  coldestLowC: number;
  warmestHighC: number;
};
export type OutdoorClimate = { years: number; firstYear: number; lastYear: number; months: ClimateMonth[] };

const climateCache = new Map<string, OutdoorClimate | null>();

/**
 * The site's outdoor climate by month from its stored archive: for each month the mean daily low and
 * high over the past whole years stored (up to `years`), and the coldest and warmest of those years'
 * monthly means. Local days of the site's time zone. Null when no whole past year is stored.
 */
export async function outdoorClimate(
  site: { id: number; timeZone: string },
  opts: { now?: Date; years?: number } = {},
): Promise<OutdoorClimate | null> {
  const now = opts.now ?? new Date();
  const status = await weatherStatus(site.id);
  if (status.state !== "ready" || !status.archiveFrom || !status.archiveTo) return null;
  const thisYear = now.getUTCFullYear();
  const firstWanted = thisYear - (opts.years ?? 10);
  const key = `${site.id}:${site.timeZone}:${status.archiveFrom}:${status.archiveTo}:${firstWanted}`;
  if (climateCache.has(key)) return climateCache.get(key)!;

  const hours = await loadHours(
    site.id,
    new Date(Date.UTC(firstWanted, 0, 1) - DAY),
    new Date(Date.UTC(thisYear, 0, 1) + DAY),
  );
  const clock = zoneClock(site.timeZone);
  // Daily low and high per local day with at least 20 hours stored.
  const perYearMonth = new Map<string, { lows: number[]; highs: number[] }>();
  let day = -1;
  let lo = Infinity;
  let hi = -Infinity;
  let n = 0;
  const close = () => {
    if (day < 0 || n < 20) return;
    const d = new Date(day * DAY);
    const y = d.getUTCFullYear();
    if (y < firstWanted || y >= thisYear) return;
    const k = `${y}:${d.getUTCMonth() + 1}`;
    const bucket = perYearMonth.get(k) ?? { lows: [], highs: [] };
    bucket.lows.push(lo);
    bucket.highs.push(hi);
    perYearMonth.set(k, bucket);
  };
  let offset = clock.offsetAt(hours.start);
  for (let i = 0; i < hours.temperature.length; i++) {
    const ms = hours.start + i * HOUR;
    if (i % 24 === 0) offset = clock.offsetAt(ms + 12 * HOUR);
    const local = Math.floor((ms + offset) / DAY);
    if (local !== day) {
      close();
      day = local;
      lo = Infinity;
      hi = -Infinity;
      n = 0;
    }
    const t = hours.temperature[i];
    if (Number.isNaN(t)) continue;
    if (t < lo) lo = t;
    if (t > hi) hi = t;
    n++;
  }
  close();

  const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
  const round1 = (x: number) => Math.round(x * 10) / 10;
  const yearsSeen = new Set<number>();
  const months: ClimateMonth[] = [];
  for (let m = 1; m <= 12; m++) {
    const lows: number[] = [];
    const highs: number[] = [];
    for (let y = firstWanted; y < thisYear; y++) {
      const b = perYearMonth.get(`${y}:${m}`);
      // A month counts for a year when at least 20 of its days are stored.
      if (!b || b.lows.length < 20) continue;
      yearsSeen.add(y);
      lows.push(mean(b.lows));
      highs.push(mean(b.highs));
    }
    if (lows.length === 0) continue;
    months.push({
      month: m,
      meanDailyLowC: round1(mean(lows)),
      meanDailyHighC: round1(mean(highs)),
      coldestLowC: round1(Math.min(...lows)),
      warmestHighC: round1(Math.max(...highs)),
    });
  }
  const years = [...yearsSeen].sort((a, b) => a - b);
  const out =
    months.length === 12
      ? { years: years.length, firstYear: years[0], lastYear: years[years.length - 1], months }
      : null;
  if (climateCache.size > 200) climateCache.clear();
  climateCache.set(key, out);
  return out;
}

export type Versus = {
  /** Local days with readings compared. */
  days: number;
  from: Date;
  to: Date;
  /** Mean of (spot − outdoors) over the night hours and the warm day hours compared; null without such hours. */
  nightAboveC: number | null;
  dayAboveC: number | null;
  /** Mean spot and outdoor temperatures of the night and day hours, for the words. */
  nightSpotC: number | null;
  nightOutC: number | null;
  daySpotC: number | null;
  dayOutC: number | null;
};

/**
 * The spot's latest few weeks of hours against the stored outdoor temperature of the same hours:
 * how far above (or below) outdoors it ran at night and by day. Null without hours to compare.
 */
export async function firstDaysVersusOutdoors(
  site: { id: number; timeZone: string },
  spotId: number,
  opts: { now?: Date } = {},
): Promise<Versus | null> {
  const now = opts.now ?? new Date();
  const from = new Date(now.getTime() - VERSUS_DAYS * DAY);
  const rollups = (await loadRollups([spotId], from, now)).get(spotId) ?? [];
  const withTemp = rollups.filter((r) => r.tN > 0 && r.tSum !== null);
  if (withTemp.length === 0) return null;
  const outdoors = await loadHours(
    site.id,
    withTemp[0].hour,
    new Date(withTemp[withTemp.length - 1].hour.getTime() + HOUR),
  );
  const clock = zoneClock(site.timeZone);
  const acc = { night: { spot: 0, out: 0, n: 0 }, day: { spot: 0, out: 0, n: 0 } };
  const days = new Set<number>();
  let first: Date | null = null;
  let last: Date | null = null;
  for (const r of withTemp) {
    const ms = r.hour.getTime();
    const i = Math.floor((ms - outdoors.start) / HOUR);
    const out = outdoors.temperature[i];
    // The archive runs some days behind; the latest past hours come from the forecast service's own
    // record of them until the archive replaces them (the weather job stores both).
    if (i < 0 || ms > now.getTime() || out === undefined || Number.isNaN(out)) continue;
    const localMs = ms + clock.offsetAt(ms);
    const hour = new Date(localMs).getUTCHours();
    const spot = r.tSum! / r.tN;
    const bucket = NIGHT_HOURS.includes(hour) ? acc.night : DAY_HOURS.includes(hour) ? acc.day : null;
    days.add(Math.floor(localMs / DAY));
    first ??= r.hour;
    last = r.hour;
    if (!bucket) continue;
    bucket.spot += spot;
    bucket.out += out;
    bucket.n++;
  }
  if (!first || !last) return null;
  const r1 = (x: number) => Math.round(x * 10) / 10;
  const of = (b: { spot: number; out: number; n: number }) =>
    b.n >= 3 ? { spot: r1(b.spot / b.n), out: r1(b.out / b.n), above: r1((b.spot - b.out) / b.n) } : null;
  const night = of(acc.night);
  const dayFig = of(acc.day);
  return {
    days: days.size,
    from: first,
    to: last,
    nightAboveC: night?.above ?? null,
    dayAboveC: dayFig?.above ?? null,
    nightSpotC: night?.spot ?? null,
    nightOutC: night?.out ?? null,
    daySpotC: dayFig?.spot ?? null,
    dayOutC: dayFig?.out ?? null,
  };
}

export type DayOne = {
  weather: "ready" | "not-fetched";
  climate: OutdoorClimate | null;
  versus: Versus | null;
  /** The response model: fitted (with its held-out error), or the date it is expected once readings line up with the weather. */
  model:
    | { state: "fitted"; days: number; errorC: number | null; years: number; firmBy: Date | null }
    | { state: "waiting"; expected: Date | null }
    | { state: "no-weather" }
    | { state: "no-past-years" };
};

/** Everything the day-one view needs for one spot. */
export async function dayOne(
  site: { id: number; timeZone: string },
  spotId: number,
  opts: { now?: Date } = {},
): Promise<DayOne> {
  const now = opts.now ?? new Date();
  const [status, climate, versus, projection] = await Promise.all([
    weatherStatus(site.id),
    outdoorClimate(site, { now }),
    firstDaysVersusOutdoors(site, spotId, { now }),
    projectedProfile(spotId, { now }),
  ]);
  let model: DayOne["model"];
  if (status.state !== "ready" || projection?.missing === "weather-not-fetched") model = { state: "no-weather" };
  else if (projection?.model) {
    const q = projection.model.quality;
    model = {
      state: "fitted",
      days: Math.round(projection.model.hoursFitted / 24),
      errorC: q ? Math.round(((q.dailyLowMaeC + q.dailyHighMaeC) / 2) * 10) / 10 : null,
      years: projection.years.length,
      firmBy: projection.firmBy,
    };
  } else if (projection?.missing === "no-past-years") model = { state: "no-past-years" };
  else {
    // MIN_DAYS whole days lined up with the weather, counted from the first reading's next midnight.
    const first = versus?.from ?? null;
    const expected = first ? new Date(Math.max(now.getTime() + DAY, first.getTime() + (MIN_DAYS + 1) * DAY)) : null;
    model = { state: "waiting", expected };
  }
  return { weather: status.state, climate, versus, model };
}
