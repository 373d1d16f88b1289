// A site's outdoor weather in PostgreSQL: one row per UTC day, 24 small integers per variable
// (see weather_days in the schema). Only whole days are kept; a forecast day never overwrites an
// archive day, and an archive day replaces a forecast day.
import { pool } from "~/.server/db";
import type { HourlySeries } from "./client";

const HOUR = 3_600_000;
const DAY = 86_400_000;

/** Hourly outdoor weather from `start` (UTC ms, a midnight), NaN where nothing is stored. */
export type OutdoorHours = {
  start: number;
  temperature: Float32Array;
  humidity: Float32Array;
  cloud: Float32Array;
  wind: Float32Array;
  shortwave: Float32Array;
  /** Hours from the forecast rather than the archive: the first index of forecast data, or the length. */
  forecastFrom: number;
};

const scale = { temperature: 10, humidity: 1, cloud: 1, wind: 10, shortwave: 1 } as const;
type Column = keyof typeof scale;
const COLUMNS = Object.keys(scale) as Column[];

const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** Stores the whole UTC days of `series`; returns the first and last day stored (null when none). */
export async function storeHours(
  siteId: number,
  series: HourlySeries,
  forecast: boolean,
): Promise<{ first: string; last: string; days: number } | null> {
  const rows: unknown[][] = [];
  const firstDay = Math.ceil(series.start / DAY) * DAY;
  const n = series.temperature.length;
  for (let day = firstDay; (day - series.start) / HOUR + 24 <= n; day += DAY) {
    const i0 = (day - series.start) / HOUR;
    const arrays = COLUMNS.map((c) => {
      const out: (number | null)[] = [];
      for (let k = 0; k < 24; k++) {
        const v = series[c][i0 + k];
        out.push(v == null ? null : Math.max(-32768, Math.min(32767, Math.round(v * scale[c]))));
      }
      return out;
    });
    // A day with a missing temperature hour is not yet whole (the archive's last days): later.
    if (arrays[0].some((v) => v === null)) continue;
    rows.push([isoDay(day), ...arrays]);
  }
  if (rows.length === 0) return null;
  for (let i = 0; i < rows.length; i += 400) {
    const chunk = rows.slice(i, i + 400);
    const params: unknown[] = [siteId, forecast];
    const values = chunk.map((r) => {
      const base = params.length;
      params.push(...r);
      return (
        `($1, $${base + 1}::date, $${base + 2}::smallint[], $${base + 3}` +
        `::smallint[], $${base + 4}::smallint[], $${base + 5}` +
        `::smallint[], $${base + 6}::smallint[], $2)`
      );
    });
    await pool().query(
      `INSERT INTO weather_days (site_id, day, temperature, humidity, cloud, wind, shortwave, forecast) VALUES ${values.join(",")}
       ON CONFLICT (site_id, day) DO UPDATE SET temperature = excluded.temperature, humidity = excluded.humidity, cloud = excluded.cloud,
         wind = excluded.wind, shortwave = excluded.shortwave, forecast = excluded.forecast
       WHERE weather_days.forecast OR NOT excluded.forecast`,
      params,
    );
  }
  return { first: rows[0][0] as string, last: rows[rows.length - 1][0] as string, days: rows.length };
}

/** The stored weather of a site for the UTC days touching [from, to). */
export async function loadHours(siteId: number, from: Date, to: Date): Promise<OutdoorHours> {
  const start = Math.floor(from.getTime() / DAY) * DAY;
  const end = Math.ceil(to.getTime() / DAY) * DAY;
  const n = Math.max(0, (end - start) / HOUR);
  const out: OutdoorHours = {
    start,
    temperature: new Float32Array(n).fill(NaN),
    humidity: new Float32Array(n).fill(NaN),
    cloud: new Float32Array(n).fill(NaN),
    wind: new Float32Array(n).fill(NaN),
    shortwave: new Float32Array(n).fill(NaN),
    forecastFrom: n,
  };
  if (n === 0) return out;
  // One row of five long strings instead of thousands of rows of arrays: node-postgres parsing
  // ten years of smallint[] row by row took several times longer than splitting these.
  const res = await pool().query<{ days: string | null; forecast: string | null } & Record<Column, string | null>>({
    text: `SELECT string_agg(to_char(day, 'YYYY-MM-DD'), ',' ORDER BY day) AS days, string_agg(forecast::int::text, ',' ORDER BY day) AS forecast,
             ${COLUMNS.map((c) => `string_agg(array_to_string(${c}, ',', ''), ';' ORDER BY day) AS ${c}`).join(", ")}
           FROM weather_days WHERE site_id = $1 AND day >= $2::date AND day < $3::date`,
    values: [siteId, isoDay(start), isoDay(end)],
  });
  const row = res.rows[0];
  if (!row?.days) return out;
  const days = row.days.split(",");
  const forecast = row.forecast!.split(",");
  const offsets = days.map((day, k) => {
    const i0 = (Date.parse(`${day}T00:00:00Z`) - start) / HOUR;
    if (forecast[k] === "1" && i0 < out.forecastFrom) out.forecastFrom = i0;
    return i0;
  });
  for (const c of COLUMNS) {
    const perDay = row[c]!.split(";");
    const target = out[c];
    const f = scale[c];
    for (let k = 0; k < perDay.length; k++) {
      const values = perDay[k].split(",");
      const i0 = offsets[k];
      for (let h = 0; h < 24 && h < values.length; h++) {
        const v = values[h];
        if (v !== "") target[i0 + h] = Number(v) / f;
      }
    }
  }
  return out;
}

export type WeatherStatus =
  | { state: "not-fetched"; lastError: string | null }
  | {
      state: "ready";
      archiveFrom: string | null;
      archiveTo: string | null;
      forecastAt: Date | null;
      years: number;
      lastError: string | null;
    };

/** What a page can say about a site's weather, from one small query: never waits on the service. */
export async function weatherStatus(siteId: number): Promise<WeatherStatus> {
  const res = await pool().query<{
    archive_from: string | null;
    archive_to: string | null;
    forecast_at: Date | null;
    last_error: string | null;
  }>(
    `SELECT to_char(archive_from, 'YYYY-MM-DD') AS archive_from, to_char(archive_to, 'YYYY-MM-DD') AS archive_to, forecast_at, last_error
     FROM weather_fetches WHERE site_id = $1`,
    [siteId],
  );
  const r = res.rows[0];
  if (!r || (r.archive_from === null && r.forecast_at === null))
    return { state: "not-fetched", lastError: r?.last_error ?? null };
  const years =
    r.archive_from && r.archive_to ? (Date.parse(r.archive_to) - Date.parse(r.archive_from)) / (365.25 * DAY) : 0;
  return {
    state: "ready",
    archiveFrom: r.archive_from,
    archiveTo: r.archive_to,
    forecastAt: r.forecast_at,
    years: Math.round(years * 10) / 10,
    lastError: r.last_error,
  };
}
