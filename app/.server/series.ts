// Chart data for a spot, columnar (uPlot's own shape) and sized for the range asked:
// raw readings for two days, hourly rollups for weeks, daily lows and highs for a year.
import { calibratedSql } from "~/.server/ingest/calibrated";
import { pool } from "~/.server/db";

export type Series = { resolution: "raw" | "hour" | "day"; t: number[]; [column: string]: (number | null)[] | string };

const RAW_SQL = `
SELECT extract(epoch FROM r.measured_at)::bigint AS t,
  ${calibratedSql("temperature", "r.temperature")} AS temp,
  ${calibratedSql("humidity", "r.humidity")} AS rh,
  dew_point_margin(${calibratedSql("temperature", "r.temperature")}, ${calibratedSql("humidity", "r.humidity")}) AS margin
FROM placements p
JOIN readings r ON r.sensor_id = p.sensor_id AND r.measured_at >= greatest(p.from_at, $2) AND r.measured_at < least(coalesce(p.to_at, 'infinity'), $3)
JOIN sensors s ON s.id = p.sensor_id
WHERE p.spot_id = $1 AND p.from_at < $3 AND (p.to_at IS NULL OR p.to_at > $2)
ORDER BY 1`;

const HOUR_SQL = `
SELECT extract(epoch FROM hour)::bigint AS t, t_min, t_max, t_sum / nullif(t_n, 0) AS temp,
  h_sum / nullif(h_n, 0) AS rh, dp_margin_min AS margin
FROM hourly_rollups WHERE spot_id = $1 AND hour >= $2 AND hour < $3 ORDER BY hour`;

const DAY_SQL = `
SELECT extract(epoch FROM (date_trunc('day', hour AT TIME ZONE $4) AT TIME ZONE $4))::bigint AS t,
  min(t_min) AS low, max(t_max) AS high, sum(t_sum) / nullif(sum(t_n), 0) AS temp,
  min(h_min) AS rh_low, max(h_max) AS rh_high, min(dp_margin_min) AS margin
FROM hourly_rollups WHERE spot_id = $1 AND hour >= $2 AND hour < $3 GROUP BY 1 ORDER BY 1`;

function columns(rows: Record<string, unknown>[], names: string[]) {
  const out: Record<string, (number | null)[]> = {};
  for (const n of names) out[n] = new Array(rows.length);
  rows.forEach((r, i) => {
    for (const n of names) {
      const v = r[n];
      out[n][i] = v == null ? null : Math.round(Number(v) * 100) / 100;
    }
  });
  return out;
}

export async function spotSeries(
  spotId: number,
  timeZone: string,
  range: "48h" | "30d" | "year",
  now = new Date(),
): Promise<Series> {
  const span = { "48h": 2, "30d": 30, year: 366 }[range] * 86_400_000;
  const from = new Date(now.getTime() - span);
  if (range === "48h") {
    const res = await pool().query(RAW_SQL, [spotId, from, now]);
    const c = columns(res.rows, ["t", "temp", "rh", "margin"]);
    return { resolution: "raw", ...c, t: c.t as number[] };
  }
  if (range === "30d") {
    const res = await pool().query(HOUR_SQL, [spotId, from, now]);
    const c = columns(res.rows, ["t", "t_min", "t_max", "temp", "rh", "margin"]);
    return { resolution: "hour", ...c, t: c.t as number[] };
  }
  const res = await pool().query(DAY_SQL, [spotId, from, now, timeZone]);
  const c = columns(res.rows, ["t", "low", "high", "temp", "rh_low", "rh_high", "margin"]);
  return { resolution: "day", ...c, t: c.t as number[] };
}

export async function latestReading(spotId: number) {
  const res = await pool().query<{
    measured_at: string;
    temp: number | null;
    rh: number | null;
    lux: number | null;
    battery: number | null;
  }>(
    `SELECT r.measured_at, ${calibratedSql("temperature", "r.temperature")} AS temp,
       ${calibratedSql("humidity", "r.humidity")} AS rh, r.lux, r.battery
     FROM placements p JOIN sensors s ON s.id = p.sensor_id
     CROSS JOIN LATERAL (SELECT * FROM readings r WHERE r.sensor_id = p.sensor_id AND r.measured_at >= p.from_at
       ORDER BY r.measured_at DESC LIMIT 1) r
     WHERE p.spot_id = $1 AND p.to_at IS NULL ORDER BY r.measured_at DESC LIMIT 1`,
    [spotId],
  );
  return res.rows[0] ?? null;
}
