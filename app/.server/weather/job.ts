// The background job that fetches each site's outdoor weather once and then tops it up: the
// forecast first (the last 92 days and the next 16: enough for a new spot's model at once), then
// the archive a year per request back to WEATHER_YEARS ago, then the archive's new days daily and
// the forecast every three hours. One request at a time, a few per round, so the free tier's rate
// limits are far away; a failing site backs off exponentially (1 min … 6 h) without holding up the
// others. Pages and ingest never wait on it: they read what is stored.
import { pool } from "~/.server/db";
import { fetchHourly, type HourlyRequest, type WeatherEndpoints } from "./client";
import { storeHours } from "./store";

const DAY = 86_400_000;
const HOUR = 3_600_000;
const FORECAST_EVERY_MS = 3 * HOUR;
const ARCHIVE_EVERY_MS = DAY;
const ARCHIVE_CHUNK_DAYS = 366;
const ARCHIVE_DELAY_DAYS = 5;
const MAX_BACKOFF_MS = 6 * HOUR;

export type WeatherJobOptions = {
  endpoints: WeatherEndpoints;
  years: number;
  /** Requests per round at most. */
  perRound?: number;
  now?: () => number;
  log?: (s: string) => void;
  /** Called after a site's forecast or archive chunk is stored (forecast warnings run then); never awaited. */
  onStored?: (siteId: number) => void;
};

type FetchRow = {
  site_id: number;
  latitude: number;
  longitude: number;
  site_latitude: number;
  site_longitude: number;
  archive_from: string | null;
  archive_to: string | null;
  forecast_at: Date | null;
  archive_checked: Date | null;
  failures: number;
  next_attempt_at: Date | null;
};

const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const dayMs = (iso: string) => Date.parse(`${iso}T00:00:00Z`);

export class WeatherJob {
  private readonly now: () => number;
  private readonly archiveChecked = new Map<number, number>();
  private running: Promise<number> | null = null;
  private readonly abort = new AbortController();

  constructor(private readonly opts: WeatherJobOptions) {
    this.now = opts.now ?? Date.now;
  }

  /** One round: a few requests for the sites most in need. Returns how many requests were made. */
  round(): Promise<number> {
    this.running ??= this.doRound().finally(() => {
      this.running = null;
    });
    return this.running;
  }

  /** Rounds until nothing is left to fetch (tests, the demo's seed): at most `maxRounds`. */
  async untilIdle(maxRounds = 100): Promise<void> {
    for (let i = 0; i < maxRounds; i++) if ((await this.round()) === 0) return;
  }

  stop() {
    this.abort.abort();
  }

  private async doRound(): Promise<number> {
    const now = this.now();
    const res = await pool().query<Omit<FetchRow, "archive_checked">>(
      `SELECT s.id AS site_id, s.latitude AS site_latitude, s.longitude AS site_longitude, f.latitude, f.longitude,
              to_char(f.archive_from, 'YYYY-MM-DD') AS archive_from, to_char(f.archive_to, 'YYYY-MM-DD') AS archive_to,
              f.forecast_at, coalesce(f.failures, 0) AS failures, f.next_attempt_at
       FROM sites s LEFT JOIN weather_fetches f ON f.site_id = s.id
       WHERE (f.next_attempt_at IS NULL OR f.next_attempt_at <= $1)
         AND (f.site_id IS NULL OR f.latitude <> s.latitude OR f.longitude <> s.longitude OR f.forecast_at IS NULL
              OR f.forecast_at <= $2 OR f.archive_from IS NULL OR f.archive_from > $3::date OR f.archive_to < $4::date)
       ORDER BY f.archive_from IS NOT NULL, f.forecast_at NULLS FIRST, s.id LIMIT 200`,
      [
        new Date(now),
        new Date(now - FORECAST_EVERY_MS),
        isoDay(Date.UTC(new Date(now).getUTCFullYear() - this.opts.years, 0, 1)),
        isoDay(Math.floor(now / DAY) * DAY - (ARCHIVE_DELAY_DAYS + 1) * DAY),
      ],
    );
    let budget = this.opts.perRound ?? 4;
    let made = 0;
    for (const row of res.rows) {
      if (budget <= 0 || this.abort.signal.aborted) break;
      const req = this.nextRequest({ ...row, archive_checked: null }, now);
      if (!req) continue;
      budget--;
      made++;
      await this.fetchOne(row, req, now);
    }
    return made;
  }

  /** What a site needs next, if anything. */
  private nextRequest(row: FetchRow, now: number): HourlyRequest | null {
    const moved =
      row.latitude == null ||
      Math.abs(row.latitude - row.site_latitude) > 1e-6 ||
      Math.abs(row.longitude - row.site_longitude) > 1e-6;
    if (moved || !row.forecast_at || now - row.forecast_at.getTime() > FORECAST_EVERY_MS)
      return { kind: "forecast", pastDays: 92, forecastDays: 16 };
    const today = Math.floor(now / DAY) * DAY;
    const archiveEnd = today - ARCHIVE_DELAY_DAYS * DAY;
    const wantFrom = Date.UTC(new Date(now).getUTCFullYear() - this.opts.years, 0, 1);
    if (row.archive_from === null || row.archive_to === null) {
      return {
        kind: "archive",
        startDate: isoDay(archiveEnd - (ARCHIVE_CHUNK_DAYS - 1) * DAY),
        endDate: isoDay(archiveEnd),
      };
    }
    const from = dayMs(row.archive_from);
    if (from > wantFrom) {
      const end = from - DAY;
      return {
        kind: "archive",
        startDate: isoDay(Math.max(wantFrom, end - (ARCHIVE_CHUNK_DAYS - 1) * DAY)),
        endDate: isoDay(end),
      };
    }
    const to = dayMs(row.archive_to);
    const checked = this.archiveChecked.get(row.site_id) ?? 0;
    if (to < archiveEnd - DAY && now - checked > ARCHIVE_EVERY_MS) {
      this.archiveChecked.set(row.site_id, now);
      return {
        kind: "archive",
        startDate: isoDay(to + DAY),
        endDate: isoDay(Math.min(archiveEnd, to + ARCHIVE_CHUNK_DAYS * DAY)),
      };
    }
    return null;
  }

  private async fetchOne(row: Omit<FetchRow, "archive_checked">, req: HourlyRequest, now: number) {
    const place = { latitude: row.site_latitude, longitude: row.site_longitude };
    const moved =
      row.latitude == null ||
      Math.abs(row.latitude - place.latitude) > 1e-6 ||
      Math.abs(row.longitude - place.longitude) > 1e-6;
    try {
      const series = await fetchHourly(this.opts.endpoints, place, req, this.abort.signal);
      if (moved) {
        // A site that moved (or is new) starts its weather afresh.
        await pool().query(`DELETE FROM weather_days WHERE site_id = $1`, [row.site_id]);
        await pool().query(
          `INSERT INTO weather_fetches (site_id, latitude, longitude) VALUES ($1, $2, $3)
           ON CONFLICT (site_id) DO UPDATE SET latitude = $2, longitude = $3, archive_from = NULL, archive_to = NULL, forecast_at = NULL`,
          [row.site_id, place.latitude, place.longitude],
        );
      }
      const stored = await storeHours(row.site_id, series, req.kind === "forecast");
      if (req.kind === "forecast") {
        await pool().query(
          `UPDATE weather_fetches SET forecast_at = $2, failures = 0, next_attempt_at = NULL, last_error = NULL WHERE site_id = $1`,
          [row.site_id, new Date(now)],
        );
      } else {
        // An archive chunk with no whole day (all inside the archive's lag) still counts as asked.
        const first = stored?.first ?? req.startDate;
        const last = stored?.last ?? row.archive_to ?? req.startDate;
        await pool().query(
          `UPDATE weather_fetches SET archive_from = LEAST(coalesce(archive_from, $2::date), $2::date), ` +
            `archive_to = GREATEST(coalesce(archive_to, $3::date), $3::date),
             failures = 0, next_attempt_at = NULL, last_error = NULL WHERE site_id = $1`,
          [row.site_id, first < req.startDate ? first : req.startDate, last],
        );
      }
      this.opts.onStored?.(row.site_id);
    } catch (err) {
      if (this.abort.signal.aborted) return;
      const failures = row.failures + 1;
      const backoff = Math.min(MAX_BACKOFF_MS, 60_000 * 2 ** Math.min(failures - 1, 12)) * (0.8 + 0.4 * Math.random());
      const message = (err instanceof Error ? err.message : String(err)).slice(0, 300);
      await pool()
        .query(
          `INSERT INTO weather_fetches (site_id, latitude, longitude, failures, next_attempt_at, last_error) VALUES ($1, $2, $3, $4, $5, $6)
         ON CONFLICT (site_id) DO UPDATE SET failures = $4, next_attempt_at = $5, last_error = $6`,
          [
            row.site_id,
            row.latitude ?? place.latitude,
            row.longitude ?? place.longitude,
            failures,
            new Date(now + backoff),
            message,
          ],
        )
        .catch(() => {});
      this.opts.log?.(
        `weather for site ${row.site_id} not fetched (${message}); next try in ${Math.round(backoff / 60_000)} min`,
      );
    }
  }
}

/** Starts the job on a timer; the returned stop ends it (and any request in flight). */
export function startWeatherJob(opts: WeatherJobOptions & { everyMs?: number }): {
  job: WeatherJob;
  stop: () => Promise<void>;
} {
  const job = new WeatherJob(opts);
  const tick = () => {
    job.round().catch((err) => opts.log?.(`weather round failed: ${err instanceof Error ? err.message : err}`));
  };
  const timer = setInterval(tick, opts.everyMs ?? 20_000);
  timer.unref();
  setTimeout(tick, 1_000).unref();
  return {
    job,
    stop: async () => {
      clearInterval(timer);
      job.stop();
    },
  };
}
