// The writer's statement: one INSERT of a batch's readings that also upserts the hourly rollups of
// the rows it really inserted, in a few variants (below), and its array parameters. Text only: it
// is run by write-statement.ts. Each variant's text is pinned by write-sql.test.ts.
import type { Reading } from "~/domain/ingest/payload";
import { calibratedSql } from "~/.server/ingest/calibrated";
import { DP_COUNTS, LOCAL_HOUR_START } from "~/.server/rollups/sql";

// Aggregate of the rows a statement really inserted, upserted into the rollups; `$1..$6` are arrays.
// The CASEs keep a missing channel NULL: least/greatest ignore NULLs and would turn it into 0.
//
// The merging variant is used when a batch holds single-channel readings (plain-number topics): a
// temperature and a humidity sent in the same second belong to one row, so a second channel fills
// the row's empty column instead of being dropped as a duplicate, and only newly filled channels
// are added to the rollup. `old` reads the rows as they were before the statement; that is sound
// because no two statements in flight hold readings of the same instant of a sensor. It is
// MATERIALIZED: inlined into the join below, PostgreSQL re-read it for every inserted row
// (10 s for 10,000 readings), and the bounds let it skip the months the batch doesn't touch.
function buildWriteSql({ merge, withRows, withSeen, optimistic, withOutside }: Variant) {
  const input = merge
    ? `raw_input AS (
  SELECT sensor_id, to_timestamp(ms / 1000) AS measured_at, temperature, humidity, lux, battery ` +
      `FROM unnest($1::int[], $2::float8[], $3::real[], $4::real[], $5::real[], $6::real[])
    AS u(sensor_id, ms, temperature, humidity, lux, battery)
), input AS (
  SELECT sensor_id, measured_at, max(temperature) AS temperature, max(humidity) AS humidity,
    max(lux) AS lux, max(battery) AS battery
  FROM raw_input GROUP BY sensor_id, measured_at
), old AS MATERIALIZED (
  SELECT r.sensor_id, r.measured_at, r.temperature, r.humidity, r.lux
  FROM readings r JOIN input i ON i.sensor_id = r.sensor_id AND i.measured_at = r.measured_at
  WHERE r.measured_at >= (SELECT min(measured_at) FROM input) AND r.measured_at <= (SELECT max(measured_at) FROM input)
)`
    : `input AS (
  SELECT sensor_id, to_timestamp(ms / 1000) AS measured_at, temperature, humidity, lux, battery ` +
      `FROM unnest($1::int[], $2::float8[], $3::real[], $4::real[], $5::real[], $6::real[])
    AS u(sensor_id, ms, temperature, humidity, lux, battery)
)`;
  const conflict = merge
    ? `ON CONFLICT (sensor_id, measured_at) DO UPDATE SET
    temperature = coalesce(readings.temperature, excluded.temperature),
    humidity = coalesce(readings.humidity, excluded.humidity),
    lux = coalesce(readings.lux, excluded.lux),
    battery = coalesce(readings.battery, excluded.battery)
  WHERE (readings.temperature IS NULL AND excluded.temperature IS NOT NULL)
    OR (readings.humidity IS NULL AND excluded.humidity IS NOT NULL)
    OR (readings.lux IS NULL AND excluded.lux IS NOT NULL)`
    : optimistic
      ? "" // a duplicate fails the statement (unique violation) and the batch is written again with the clause below
      : "ON CONFLICT DO NOTHING";
  // `fresh`: the channels this statement added (all of them for a new row).
  const fresh = merge
    ? `fresh AS (
  SELECT ins.sensor_id, ins.measured_at, ins.battery,
    CASE WHEN o.temperature IS NULL THEN ins.temperature END AS temperature,
    CASE WHEN o.humidity IS NULL THEN ins.humidity END AS humidity,
    CASE WHEN o.lux IS NULL THEN ins.lux END AS lux,
    ins.temperature AS t_row, ins.humidity AS h_row
  FROM ins LEFT JOIN old o ON o.sensor_id = ins.sensor_id AND o.measured_at = ins.measured_at
)`
    : `fresh AS (SELECT * FROM ins)`;
  // Readings that met a stored row with a different value in a channel both have. The snapshot of
  // \`readings\` is the one before this statement, so it holds exactly the rows the input ran into.
  // A plain INSERT that succeeded met none, so only the ON CONFLICT variants look.
  const conflicts = optimistic
    ? ""
    : merge
      ? `, conflicts AS (
  SELECT i.sensor_id, i.measured_at FROM input i JOIN old o ON o.sensor_id = i.sensor_id AND o.measured_at = i.measured_at
  WHERE i.temperature <> o.temperature OR i.humidity <> o.humidity OR i.lux <> o.lux
)`
      : `, conflicts AS (
  SELECT i.sensor_id, i.measured_at FROM input i JOIN readings r ON r.sensor_id = i.sensor_id AND r.measured_at = i.measured_at
  WHERE r.measured_at >= (SELECT min(measured_at) FROM input) AND r.measured_at <= (SELECT max(measured_at) FROM input)
    AND (i.temperature <> r.temperature OR i.humidity <> r.humidity OR i.lux <> r.lux)
)`;
  return `
WITH ${input}, ins AS (
  INSERT INTO readings (sensor_id, measured_at, temperature, humidity, lux, battery)
  SELECT * FROM input ${conflict}
  RETURNING sensor_id, measured_at, temperature, humidity, lux, battery
), ${fresh}, placed AS (
  SELECT p.spot_id, f.sensor_id, f.measured_at, f.battery, si.time_zone,
    ${calibratedSql("temperature", "f.temperature")} AS t,
    ${calibratedSql("humidity", "f.humidity")} AS h,
    ${calibratedSql("lux", "f.lux")} AS l,${
      // A merged row's dew point is of the whole row, not only of the channels this statement added.
      merge
        ? `
    dew_point_margin(${calibratedSql("temperature", "f.t_row")}, ${calibratedSql("humidity", "f.h_row")}) AS dp,`
        : ""
    }
    ${LOCAL_HOUR_START("f.measured_at", "si.time_zone")} AS hour
  FROM fresh f
  JOIN placements p ON p.sensor_id = f.sensor_id AND p.from_at <= f.measured_at
    AND (p.to_at IS NULL OR f.measured_at < p.to_at)
  JOIN sensors s ON s.id = f.sensor_id
  JOIN spots sp ON sp.id = p.spot_id
  JOIN sites si ON si.id = sp.site_id
), agg AS (
  SELECT spot_id, hour,
    count(t)::int AS t_n, min(t) AS t_min, max(t) AS t_max, sum(t) AS t_sum,
    count(h)::int AS h_n, min(h) AS h_min, max(h) AS h_max, sum(h) AS h_sum,
    min(${merge ? "dp" : "dew_point_margin(t, h)"}) AS dp_margin_min, count(l)::int AS lux_n, sum(l) AS lux_sum, max(l) AS lux_max,
    ${DP_COUNTS(merge ? "CASE WHEN t IS NOT NULL OR h IS NOT NULL THEN dp END" : "dew_point_margin(t, h)")}
  FROM placed GROUP BY spot_id, hour
), up AS (
  INSERT INTO hourly_rollups AS r (spot_id, hour, t_n, t_min, t_max, t_sum, h_n, h_min, h_max, h_sum, dp_margin_min, lux_n, lux_sum, lux_max, dp_n, dp_under_n)
  SELECT * FROM agg ORDER BY spot_id, hour -- one lock order for every writer, so no deadlocks
  ON CONFLICT (spot_id, hour) DO UPDATE SET
    t_n = r.t_n + excluded.t_n, t_min = least(r.t_min, excluded.t_min), t_max = greatest(r.t_max, excluded.t_max),
    t_sum = CASE WHEN r.t_sum IS NULL THEN excluded.t_sum ELSE r.t_sum + coalesce(excluded.t_sum, 0) END,
    h_n = r.h_n + excluded.h_n, h_min = least(r.h_min, excluded.h_min), h_max = greatest(r.h_max, excluded.h_max),
    h_sum = CASE WHEN r.h_sum IS NULL THEN excluded.h_sum ELSE r.h_sum + coalesce(excluded.h_sum, 0) END,
    dp_margin_min = least(r.dp_margin_min, excluded.dp_margin_min),
    dp_n = r.dp_n + excluded.dp_n, dp_under_n = r.dp_under_n + excluded.dp_under_n,
    lux_n = r.lux_n + excluded.lux_n,
    lux_sum = CASE WHEN r.lux_sum IS NULL THEN excluded.lux_sum ELSE r.lux_sum + coalesce(excluded.lux_sum, 0) END,
    lux_max = greatest(r.lux_max, excluded.lux_max)
  RETURNING 1
), seen AS (${
    withSeen
      ? `
  UPDATE sensors s SET last_seen_at = greatest(s.last_seen_at, x.last_at),
    battery = coalesce(x.battery, s.battery)
  FROM (
    SELECT sensor_id, max(measured_at) AS last_at,
      (array_agg(battery ORDER BY measured_at DESC) FILTER (WHERE battery IS NOT NULL))[1] AS battery
    FROM input GROUP BY sensor_id
  ) x
  WHERE s.id = x.sensor_id AND (s.last_seen_at IS NULL OR x.last_at >= s.last_seen_at)
  RETURNING 1`
      : "SELECT 1 WHERE false"
  }
)${conflicts}
SELECT (SELECT count(*)::int FROM ins) AS inserted, (SELECT count(*)::int FROM up) AS hours,
  ${optimistic ? "NULL::json" : `(SELECT json_agg(json_build_array(sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint)) FROM conflicts)`} AS conflicts,
  ${withOutside ? "greatest(0, (SELECT count(*) FROM fresh) - (SELECT count(*) FROM placed))::int" : "0"} AS outside,
  (SELECT count(*)::int FROM seen) AS seen,
  ${
    withRows
      ? `coalesce((SELECT json_agg(json_build_array(spot_id, sensor_id, measured_at, t, h, battery) ORDER BY measured_at)
    FROM placed), '[]'::json)`
      : `'[]'::json`
  } AS placed`;
}

// The committed rows go back to the process only when someone listens (the alert engine). The
// sensor's last-seen time and battery are left out of the halves of a split batch (see the
// writer's splitStatements), which set them in a statement of their own (SEEN_SQL).
const SQL = new Map<string, string>();
// `optimistic`: a plain INSERT, about half the cost of INSERT … ON CONFLICT DO NOTHING per row
// (no speculative insertion), tried first for batches without single-channel readings. The
// primary key still refuses any duplicate; the batch is then written with ON CONFLICT.
// `withOutside`: count inserted rows in no placement (write() callers are told; store() skips it).
export type Variant = {
  merge: boolean;
  withRows: boolean;
  withKeys: boolean;
  withSeen: boolean;
  optimistic: boolean;
  withOutside: boolean;
};
/** The statement text of a variant, and a name to prepare it under. */
export function sqlFor(v: Variant): { text: string; name: string } {
  const optimistic = v.optimistic && !v.merge;
  const name =
    `nw-write-${v.merge ? "m" : "p"}${v.withRows ? "r" : ""}` +
    `${v.withKeys ? "k" : ""}${v.withSeen ? "s" : ""}` +
    `${optimistic ? "o" : ""}${v.withOutside ? "c" : ""}`;
  let text = SQL.get(name);
  if (!text) SQL.set(name, (text = buildWriteSql({ ...v, optimistic }) + (v.withKeys ? KEYS : "")));
  return { text, name };
}

// With several callers in one group commit, each needs to know which of its rows were new, and
// which of those fall in no placement (withKeys implies withOutside: some caller counts).
const KEYS = `,
  coalesce((SELECT json_agg(json_build_array(sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint)) FROM ins), '[]'::json) AS keys,
  coalesce((SELECT json_agg(json_build_array(f.sensor_id, (extract(epoch FROM f.measured_at) * 1000)::bigint)) FROM fresh f
    WHERE NOT EXISTS (SELECT 1 FROM placed p WHERE p.sensor_id = f.sensor_id AND p.measured_at = f.measured_at)), '[]'::json) AS outside_keys`;

// The seen update of a split batch, run by the later half after the earlier half committed.
export const SEEN_SQL = `UPDATE sensors SET last_seen_at = greatest(last_seen_at, to_timestamp($2::float8 / 1000)), battery = coalesce($3::real, battery)
  WHERE id = $1 AND (last_seen_at IS NULL OR to_timestamp($2::float8 / 1000) >= last_seen_at)`;

/** A PostgreSQL array literal of finite numbers (NULL for null); validation has refused NaN/∞. */
function literal(values: (number | null)[]): string {
  let out = "{";
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (i > 0) out += ",";
    out += v === null || v === undefined || !Number.isFinite(v) ? "NULL" : String(v);
  }
  return out + "}";
}

/**
 * The statement's array parameters, built here as literals: node-pg's generic array and Date
 * serialisation cost more per row than the insert itself. Times travel as epoch milliseconds.
 */
export function columns(rows: Reading[]): string[] {
  const n = rows.length;
  const ids: number[] = new Array(n);
  const ms: number[] = new Array(n);
  const t: (number | null)[] = new Array(n);
  const h: (number | null)[] = new Array(n);
  const l: (number | null)[] = new Array(n);
  const b: (number | null)[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const r = rows[i];
    ids[i] = r.sensorId;
    ms[i] = r.measuredAt.getTime();
    t[i] = r.temperature;
    h[i] = r.humidity;
    l[i] = r.lux;
    b[i] = r.battery;
  }
  return [literal(ids), literal(ms), literal(t), literal(h), literal(l), literal(b)];
}
