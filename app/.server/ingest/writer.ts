// The one path every reading takes into PostgreSQL. Readings from all connections are grouped for
// a few milliseconds and written in one transaction: raw rows deduplicated on (sensor, measured_at),
// and the hourly rollups of the spot each sensor was placed in, counting only rows really inserted.
// A caller's promise resolves only after COMMIT, which is what lets MQTT ack after commit.
import { calibratedSql } from "~/.server/ingest/calibrated";
import type pg from "pg";
import { pool } from "~/.server/db";
import type { Reading } from "~/domain/ingest/payload";

export type CommittedReading = { spotId: number; sensorId: number; measuredAt: Date; t: number | null; h: number | null; battery: number | null };
export type BatchListener = (rows: CommittedReading[]) => void | Promise<void>;
export type WriteResult = { inserted: number };

/**
 * SQL for the instant the local hour containing `at` began: `at` minus the minutes and seconds past
 * the local hour. Rounding the local wall time and converting it back would be ambiguous in the hour
 * clocks go back (PostgreSQL reads the repeated wall time as the later instant, filing a reading
 * under an hour that starts after it).
 */
export const LOCAL_HOUR_START = (at: string, timeZone: string) =>
  `(${at} - ((${at} AT TIME ZONE ${timeZone}) - date_trunc('hour', ${at} AT TIME ZONE ${timeZone})))`;

// Aggregate of the rows a statement really inserted, upserted into the rollups; `$1..$6` are arrays.
// The CASEs keep a missing channel NULL: least/greatest ignore NULLs and would turn it into 0.
//
// The merging variant is used when a batch holds single-channel readings (plain-number topics): a
// temperature and a humidity sent in the same second belong to one row, so a second channel fills
// the row's empty column instead of being dropped as a duplicate, and only newly filled channels
// are added to the rollup. `old` reads the rows as they were before the statement; that is sound
// because this process runs one flush at a time.
function buildWriteSql(merge: boolean, withRows: boolean) {
  const input = merge
    ? `raw_input AS (
  SELECT sensor_id, to_timestamp(ms / 1000) AS measured_at, temperature, humidity, lux, battery FROM unnest($1::int[], $2::float8[], $3::real[], $4::real[], $5::real[], $6::real[])
    AS u(sensor_id, ms, temperature, humidity, lux, battery)
), input AS (
  SELECT sensor_id, measured_at, max(temperature) AS temperature, max(humidity) AS humidity,
    max(lux) AS lux, max(battery) AS battery
  FROM raw_input GROUP BY sensor_id, measured_at
), old AS (
  SELECT r.sensor_id, r.measured_at, r.temperature, r.humidity, r.lux
  FROM readings r JOIN input i ON i.sensor_id = r.sensor_id AND i.measured_at = r.measured_at
)`
    : `input AS (
  SELECT sensor_id, to_timestamp(ms / 1000) AS measured_at, temperature, humidity, lux, battery FROM unnest($1::int[], $2::float8[], $3::real[], $4::real[], $5::real[], $6::real[])
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
    : `fresh AS (SELECT ins.*, ins.temperature AS t_row, ins.humidity AS h_row FROM ins)`;
  return `
WITH ${input}, ins AS (
  INSERT INTO readings (sensor_id, measured_at, temperature, humidity, lux, battery)
  SELECT * FROM input ${conflict}
  RETURNING sensor_id, measured_at, temperature, humidity, lux, battery
), ${fresh}, placed AS (
  SELECT p.spot_id, f.sensor_id, f.measured_at, f.battery, si.time_zone,
    ${calibratedSql("temperature", "f.temperature")} AS t,
    ${calibratedSql("humidity", "f.humidity")} AS h,
    ${calibratedSql("lux", "f.lux")} AS l,
    dew_point_margin(${calibratedSql("temperature", "f.t_row")}, ${calibratedSql("humidity", "f.h_row")}) AS dp,
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
    min(dp) AS dp_margin_min, count(l)::int AS lux_n, sum(l) AS lux_sum
  FROM placed GROUP BY spot_id, hour
), up AS (
  INSERT INTO hourly_rollups AS r (spot_id, hour, t_n, t_min, t_max, t_sum, h_n, h_min, h_max, h_sum, dp_margin_min, lux_n, lux_sum)
  SELECT * FROM agg ORDER BY spot_id, hour -- one lock order for every writer, so no deadlocks
  ON CONFLICT (spot_id, hour) DO UPDATE SET
    t_n = r.t_n + excluded.t_n, t_min = least(r.t_min, excluded.t_min), t_max = greatest(r.t_max, excluded.t_max),
    t_sum = CASE WHEN r.t_sum IS NULL THEN excluded.t_sum ELSE r.t_sum + coalesce(excluded.t_sum, 0) END,
    h_n = r.h_n + excluded.h_n, h_min = least(r.h_min, excluded.h_min), h_max = greatest(r.h_max, excluded.h_max),
    h_sum = CASE WHEN r.h_sum IS NULL THEN excluded.h_sum ELSE r.h_sum + coalesce(excluded.h_sum, 0) END,
    dp_margin_min = least(r.dp_margin_min, excluded.dp_margin_min),
    lux_n = r.lux_n + excluded.lux_n,
    lux_sum = CASE WHEN r.lux_sum IS NULL THEN excluded.lux_sum ELSE r.lux_sum + coalesce(excluded.lux_sum, 0) END
  RETURNING 1
), seen AS (
  UPDATE sensors s SET last_seen_at = greatest(s.last_seen_at, x.last_at),
    battery = coalesce(x.battery, s.battery)
  FROM (
    SELECT sensor_id, max(measured_at) AS last_at,
      (array_agg(battery ORDER BY measured_at DESC) FILTER (WHERE battery IS NOT NULL))[1] AS battery
    FROM input GROUP BY sensor_id
  ) x
  WHERE s.id = x.sensor_id AND (s.last_seen_at IS NULL OR x.last_at >= s.last_seen_at)
  RETURNING 1
)
SELECT (SELECT count(*)::int FROM ins) AS inserted, (SELECT count(*)::int FROM up) AS hours,
  (SELECT count(*)::int FROM seen) AS seen,
  ${withRows ? `coalesce((SELECT json_agg(json_build_array(spot_id, sensor_id, measured_at, t, h, battery) ORDER BY measured_at)
    FROM placed), '[]'::json)` : `'[]'::json`} AS placed`;
}

// The committed rows go back to the process only when someone listens (the alert engine).
const SQL = {
  plain: buildWriteSql(false, false),
  plainRows: buildWriteSql(false, true),
  merge: buildWriteSql(true, false),
  mergeRows: buildWriteSql(true, true),
};

// With several callers in one group commit, each needs to know which of its rows were new.
const KEYS = `,
  coalesce((SELECT json_agg(json_build_array(sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint)) FROM ins), '[]'::json) AS keys`;

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

type Pending = { readings: Reading[]; resolve: (r: WriteResult) => void; reject: (e: Error) => void };

export type WriterStats = {
  batches: number;
  readings: number;
  inserted: number;
  failures: number;
  lastCommitMs: number;
  commitMs: number[]; // recent commit latencies, newest last
};

// Readings are split by sensor over a few independent queues ("shards"), each with one statement
// in flight at a time: two statements can commit at once (one parses while the other waits on
// disk), and no two statements in flight ever hold readings of the same sensor, which keeps the
// merging statement's before-image sound and the per-sensor order of commits.
type Shard = { pending: Pending[]; count: number; timer: NodeJS.Timeout | null; flushing: Promise<void> | null };

export class ReadingWriter {
  private shards: Shard[];
  private listeners = new Set<BatchListener>();
  readonly stats: WriterStats = { batches: 0, readings: 0, inserted: 0, failures: 0, lastCommitMs: 0, commitMs: [] };

  constructor(
    private readonly getPool: () => pg.Pool = pool,
    readonly flushMs = 5,
    readonly maxBatch = 2000,
    shardCount = 2,
  ) {
    this.shards = Array.from({ length: Math.max(1, shardCount) }, () => ({ pending: [], count: 0, timer: null, flushing: null }));
  }

  onBatch(listener: BatchListener) {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /** Resolves after the readings are committed (or were already stored); rejects if they were not. */
  write(readings: Reading[]): Promise<WriteResult> {
    if (readings.length === 0) return Promise.resolve({ inserted: 0 });
    const k = this.shards.length;
    const first = readings[0].sensorId % k;
    if (k === 1 || readings.every((r) => r.sensorId % k === first)) return this.enqueue(this.shards[first], readings);
    const parts: Reading[][] = this.shards.map(() => []);
    for (const r of readings) parts[r.sensorId % k].push(r);
    return Promise.all(parts.map((part, i) => (part.length > 0 ? this.enqueue(this.shards[i], part) : { inserted: 0 }))).then((rs) => ({
      inserted: rs.reduce((n, r) => n + r.inserted, 0),
    }));
  }

  private enqueue(shard: Shard, readings: Reading[]): Promise<WriteResult> {
    return new Promise((resolve, reject) => {
      shard.pending.push({ readings, resolve, reject });
      shard.count += readings.length;
      this.kick(shard, shard.count >= this.maxBatch ? 0 : this.flushMs);
    });
  }

  private kick(shard: Shard, delay: number) {
    if (shard.flushing) return; // the running flush takes what is queued when it is done
    if (delay === 0) {
      if (shard.timer) clearTimeout(shard.timer);
      shard.timer = null;
      shard.flushing = this.flush(shard);
      return;
    }
    shard.timer ??= setTimeout(() => {
      shard.timer = null;
      shard.flushing = this.flush(shard);
    }, delay);
  }

  private async flush(shard: Shard) {
    try {
      while (shard.pending.length > 0) {
        const batch: Pending[] = [];
        let n = 0;
        while (shard.pending.length > 0 && (n === 0 || n + shard.pending[0].readings.length <= this.maxBatch * 2)) {
          const p = shard.pending.shift()!;
          batch.push(p);
          n += p.readings.length;
        }
        shard.count -= n;
        await this.commit(batch, n);
      }
    } finally {
      shard.flushing = null;
      if (shard.pending.length > 0) this.kick(shard, 0);
    }
  }

  private async commit(batch: Pending[], n: number) {
    // Array literals built here: node-pg's generic array and Date serialisation cost more per row
    // than the insert itself. Times travel as epoch milliseconds.
    const ids: number[] = new Array(n);
    const ms: number[] = new Array(n);
    const t: (number | null)[] = new Array(n);
    const h: (number | null)[] = new Array(n);
    const l: (number | null)[] = new Array(n);
    const b: (number | null)[] = new Array(n);
    let i = 0;
    for (const p of batch) {
      for (const r of p.readings) {
        ids[i] = r.sensorId;
        ms[i] = r.measuredAt.getTime();
        t[i] = r.temperature;
        h[i] = r.humidity;
        l[i] = r.lux;
        b[i] = r.battery;
        i++;
      }
    }
    const cols = [literal(ids), literal(ms), literal(t), literal(h), literal(l), literal(b)];
    const started = performance.now();
    let client: pg.PoolClient | undefined;
    try {
      client = await this.getPool().connect();
      // One statement is its own transaction; it commits before the result comes back.
      const merge = batch.some((p) => p.readings.some((r) => r.partial));
      const rows = this.listeners.size > 0;
      const text = SQL[merge ? (rows ? "mergeRows" : "merge") : rows ? "plainRows" : "plain"] + (batch.length > 1 ? KEYS : "");
      const res = await client.query(text, cols);
      client.release();
      client = undefined;
      const row = res.rows[0] as {
        inserted: number;
        placed: [number, number, string, number | null, number | null, number | null][];
        keys?: [number, number][];
      };
      const ms = performance.now() - started;
      this.stats.batches++;
      this.stats.readings += n;
      this.stats.inserted += row.inserted;
      this.stats.lastCommitMs = ms;
      this.stats.commitMs.push(ms);
      if (this.stats.commitMs.length > 500) this.stats.commitMs.splice(0, this.stats.commitMs.length - 500);
      if (row.keys) {
        const fresh = new Set(row.keys.map(([id, ms]) => `${id}:${ms}`));
        for (const p of batch) {
          let inserted = 0;
          for (const r of p.readings) if (fresh.delete(`${r.sensorId}:${r.measuredAt.getTime()}`)) inserted++;
          p.resolve({ inserted });
        }
      } else {
        batch[0].resolve({ inserted: row.inserted });
      }
      if (this.listeners.size > 0 && row.placed.length > 0) {
        const committed = row.placed.map(([spotId, sensorId, at, t, h, battery]) => ({
          spotId, sensorId, measuredAt: new Date(at), t, h, battery,
        }));
        for (const l of this.listeners) {
          Promise.resolve()
            .then(() => l(committed))
            .catch((err) => console.error("[writer] batch listener failed:", err));
        }
      }
    } catch (err) {
      client?.release(true);
      this.stats.failures++;
      const error = err instanceof Error ? err : new Error(String(err));
      for (const p of batch) p.reject(error);
    }
  }

  /** Waits for everything queued so far to be committed or refused. */
  async drain() {
    for (;;) {
      const busy = this.shards.filter((s) => s.pending.length > 0 || s.flushing || s.timer);
      if (busy.length === 0) return;
      for (const s of busy) if (s.timer && !s.flushing) this.kick(s, 0);
      await Promise.all(busy.map((s) => s.flushing ?? new Promise((r) => setTimeout(r, 1))));
    }
  }

}

type Holder = { writer?: ReadingWriter };
const holder = ((globalThis as Record<string, unknown>).__nichewiseWriter ??= {}) as Holder;

/** The process's writer: shared by the broker, the HTTP route and CSV import. */
export function writer(): ReadingWriter {
  holder.writer ??= new ReadingWriter();
  return holder.writer;
}
