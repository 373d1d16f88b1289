// Exports of a spot's readings (raw or hourly) and its season profile, as CSV or JSON. Rows are read
// in keyset-paginated batches and written into a ReadableStream as the client takes them (pull), so a
// year of one-minute readings (~525,600 rows) never sits in memory at once.
import { calibratedSql } from "~/.server/ingest/calibrated";
import { pool } from "~/.server/db";
import { zonedToUtc } from "~/lib/time";
import { spotProfiles } from "~/.server/profiles";
import { periodFigures } from "~/domain/season/slim";
import type { Site, Spot } from "~/db/schema.server";

export const EXPORT_BATCH = 5000;

export type ExportFormat = "csv" | "json";

type Cell = string | number | null;
type Batch = { rows: Cell[][]; done: boolean };

// Calibrated values, attributed to the spot by where each sensor was placed at each reading's time,
// as the charts show them. Keyset on (measured_at, sensor_id) inside a time window of WINDOW_DAYS
// ($4 to $7): the window keeps each page an index range scan instead of re-reading the rest of the
// period for every page.
const WINDOW_MS = 2 * 86_400_000;
const RAW_PAGE = `
SELECT to_char(r.measured_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') AS time, r.sensor_id,
  ${calibratedSql("temperature", "r.temperature")} AS temperature,
  ${calibratedSql("humidity", "r.humidity")} AS humidity,
  ${calibratedSql("lux", "r.lux")} AS lux, r.battery, r.measured_at::text AS k
FROM placements p
JOIN readings r ON r.sensor_id = p.sensor_id AND r.measured_at >= greatest(p.from_at, $2) AND r.measured_at < least(coalesce(p.to_at, 'infinity'), $3)
JOIN sensors s ON s.id = p.sensor_id
WHERE p.spot_id = $1 AND p.from_at < $3 AND (p.to_at IS NULL OR p.to_at > $2)
  AND r.measured_at >= $4::timestamptz AND r.measured_at < $7::timestamptz
  AND (r.measured_at, r.sensor_id) > ($4::timestamptz, $5::int)
ORDER BY r.measured_at, r.sensor_id
LIMIT $6`;

const HOURLY_PAGE = `
SELECT to_char(hour AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS"Z"') AS hour,
  t_n, round((t_sum / nullif(t_n, 0))::numeric, 2)::float8 AS t_mean, t_min, t_max,
  h_n, round((h_sum / nullif(h_n, 0))::numeric, 1)::float8 AS rh_mean, h_min, h_max, round(dp_margin_min::numeric, 2)::float8 AS dp_margin_min,
  lux_n, round((lux_sum / nullif(lux_n, 0))::numeric, 0)::float8 AS lux_mean, hour AS k
FROM hourly_rollups WHERE spot_id = $1 AND hour >= $2 AND hour < $3 AND hour > $4::timestamptz
ORDER BY hour LIMIT $5`;

export const RAW_COLUMNS = ["time", "sensor_id", "temperature_c", "humidity_pct", "lux", "battery_pct"];
export const HOURLY_COLUMNS = [
  "hour_start",
  "temperature_samples",
  "temperature_mean_c",
  "temperature_min_c",
  "temperature_max_c",
  "humidity_samples",
  "humidity_mean_pct",
  "humidity_min_pct",
  "humidity_max_pct",
  "dew_point_margin_min_c",
  "lux_samples",
  "lux_mean",
];

type Pager = () => Promise<Batch>;

function rawPager(spotId: number, from: Date, to: Date): Pager {
  let after: Date | string = from;
  let afterSensor = -1;
  let windowEnd = new Date(Math.min(to.getTime(), from.getTime() + WINDOW_MS));
  return async () => {
    const out: Cell[][] = [];
    // Gather up to a batch, moving window by window; empty windows (sensor offline) cost one lookup.
    while (out.length < EXPORT_BATCH) {
      const res = await pool().query({
        text: RAW_PAGE,
        values: [spotId, from, to, after, afterSensor, EXPORT_BATCH - out.length, windowEnd],
        rowMode: "array",
      });
      const rows = res.rows as Cell[][];
      for (const r of rows) out.push(r.slice(0, 6));
      const last = rows.at(-1);
      if (last) {
        after = last[6] as string;
        afterSensor = last[1] as number;
      }
      if (out.length >= EXPORT_BATCH) break;
      // The window is used up: the next one starts where it ended.
      if (windowEnd.getTime() >= to.getTime()) return { rows: out, done: true };
      after = windowEnd;
      afterSensor = -1;
      windowEnd = new Date(Math.min(to.getTime(), windowEnd.getTime() + WINDOW_MS));
    }
    return { rows: out, done: false };
  };
}

function hourlyPager(spotId: number, from: Date, to: Date): Pager {
  let after: Date = new Date(0);
  return async () => {
    const res = await pool().query({
      text: HOURLY_PAGE,
      values: [spotId, from, to, after, EXPORT_BATCH],
      rowMode: "array",
    });
    const rows = res.rows as Cell[][];
    const last = rows.at(-1);
    if (last) after = last[12] as unknown as Date;
    return { rows: rows.map((r) => r.slice(0, 12)), done: rows.length < EXPORT_BATCH };
  };
}

const csvCell = (v: Cell) => {
  if (v == null) return "";
  const s = String(v);
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};
export const csvLine = (cells: Cell[]) => `${cells.map(csvCell).join(",")}\r\n`;

/** A stream that asks the pager for the next batch only when the consumer wants more. */
function streamRows(opts: {
  format: ExportFormat;
  columns: string[];
  meta: Record<string, unknown>;
  pager: Pager;
}): ReadableStream<Uint8Array> {
  const enc = new TextEncoder();
  let started = false;
  let finished = false;
  let first = true;
  return new ReadableStream<Uint8Array>(
    {
      async pull(controller) {
        if (!started) {
          started = true;
          controller.enqueue(
            enc.encode(
              opts.format === "csv"
                ? csvLine(opts.columns)
                : `{"meta":${JSON.stringify(opts.meta)},"columns":${JSON.stringify(opts.columns)},"rows":[`,
            ),
          );
          return;
        }
        if (finished) return;
        const batch = await opts.pager();
        let text = "";
        if (opts.format === "csv") {
          for (const r of batch.rows) text += csvLine(r);
        } else {
          for (const r of batch.rows) {
            text += `${first ? "\n" : ",\n"}${JSON.stringify(r)}`;
            first = false;
          }
        }
        if (batch.done) {
          finished = true;
          if (opts.format === "json") text += "\n]}\n";
        }
        if (text) controller.enqueue(enc.encode(text));
        if (finished) controller.close();
      },
    },
    { highWaterMark: 1 },
  );
}

export function exportReadings(opts: {
  spot: Spot;
  site: Site;
  kind: "raw" | "hourly";
  format: ExportFormat;
  from: Date;
  to: Date;
}) {
  const meta = {
    site: opts.site.name,
    spot: opts.spot.name,
    spotId: opts.spot.id,
    kind: opts.kind,
    from: opts.from.toISOString(),
    to: opts.to.toISOString(),
    timeZone: opts.site.timeZone,
    note:
      opts.kind === "raw"
        ? "Readings as measured, with each sensor's calibration offsets applied; times in UTC."
        : "Hourly rollups; hour_start is the UTC instant the local hour starts.",
  };
  return streamRows({
    format: opts.format,
    columns: opts.kind === "raw" ? RAW_COLUMNS : HOURLY_COLUMNS,
    meta,
    pager:
      opts.kind === "raw" ? rawPager(opts.spot.id, opts.from, opts.to) : hourlyPager(opts.spot.id, opts.from, opts.to),
  });
}

export const PROFILE_COLUMNS = [
  "month",
  "days_observed",
  "lowest_c",
  "highest_c",
  "p05_c",
  "p95_c",
  "mean_daily_low_c",
  "mean_daily_high_c",
  "mean_day_night_difference_c",
  "humidity_lowest_pct",
  "humidity_mean_pct",
  "humidity_highest_pct",
  "condensation_hours",
  "mean_dli",
];

/** The season profile of the period: per calendar month and per season, from the hourly rollups. */
export async function exportProfile(opts: { spot: Spot; site: Site; format: ExportFormat; from: Date; to: Date }) {
  const profile = (
    await spotProfiles(opts.site, [opts.spot.id], opts.to, { range: { from: opts.from, to: opts.to } })
  ).get(opts.spot.id)!;
  const r2 = (v: number | null) => (v == null ? null : Math.round(v * 100) / 100);
  const line = (key: string, p: (typeof profile.months)[number] | (typeof profile.seasons)[number]): Cell[] => [
    key,
    p.coverage.daysObserved,
    r2(p.temperature.lowest),
    r2(p.temperature.highest),
    r2(p.temperature.p05),
    r2(p.temperature.p95),
    r2(p.temperature.meanDailyLow),
    r2(p.temperature.meanDailyHigh),
    r2(p.temperature.meanDayNightDifference),
    r2(p.humidity.lowest),
    r2(p.humidity.mean),
    r2(p.humidity.highest),
    p.condensationHours,
    r2(p.light.meanDli),
  ];
  const enc = new TextEncoder();
  if (opts.format === "csv") {
    const lines = [
      csvLine(PROFILE_COLUMNS),
      ...profile.months.map((m) => csvLine(line(m.key, m))),
      ...profile.seasons.map((s) => csvLine(line(s.label, s))),
    ];
    return new ReadableStream<Uint8Array>({
      start(c) {
        for (const l of lines) c.enqueue(enc.encode(l));
        c.close();
      },
    });
  }
  const body = JSON.stringify({
    meta: {
      site: opts.site.name,
      spot: opts.spot.name,
      spotId: opts.spot.id,
      from: opts.from.toISOString(),
      to: opts.to.toISOString(),
      timeZone: opts.site.timeZone,
      hemisphere: profile.hemisphere,
    },
    months: profile.months.map((m) => ({ key: m.key, ...periodFigures(m) })),
    seasons: profile.seasons.map((s) => ({ key: s.key, label: s.label, season: s.season, ...periodFigures(s) })),
  });
  return new ReadableStream<Uint8Array>({
    start(c) {
      c.enqueue(enc.encode(body));
      c.close();
    },
  });
}

/** The period asked for: ?from=YYYY-MM-DD&to=YYYY-MM-DD (local dates of the site, `to` inclusive); a year to now by default. */
export function parsePeriod(q: URLSearchParams, timeZone: string, now = new Date()) {
  const day = (s: string | null) => {
    const m = s ? /^(\d{4})-(\d{2})-(\d{2})$/.exec(s) : null;
    return m ? { year: +m[1], month: +m[2], day: +m[3] } : null;
  };
  const f = day(q.get("from"));
  const t = day(q.get("to"));
  if ((q.get("from") && !f) || (q.get("to") && !t)) return { error: "from and to are dates, YYYY-MM-DD" } as const;
  const from = f ? zonedToUtc(f, timeZone) : new Date(now.getTime() - 365 * 86_400_000);
  const to = t ? zonedToUtc({ ...t, day: t.day + 1 }, timeZone) : now;
  if (!(from < to)) return { error: "from must be before to" } as const;
  if (to.getTime() - from.getTime() > 800 * 86_400_000) return { error: "a period is at most 800 days" } as const;
  return { from, to } as const;
}
