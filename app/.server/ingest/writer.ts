// The one path every reading takes into PostgreSQL. Readings from all connections are grouped for
// a few milliseconds and written in one transaction: raw rows deduplicated on (sensor, measured_at),
// and the hourly rollups of the spot each sensor was placed in, counting only rows really inserted.
// A caller's promise resolves only after COMMIT, which is what lets MQTT ack after commit.
import { calibratedSql } from "~/.server/ingest/calibrated";
import { sensorInfo } from "~/.server/ingest/sensors";
import type pg from "pg";
import { pool } from "~/.server/db";
import type { Reading } from "~/domain/ingest/payload";
import { zoneClock } from "~/domain/season/local-time";
import { CONDENSATION_MARGIN_C } from "~/domain/season/profile";

export type CommittedReading = { spotId: number; sensorId: number; measuredAt: Date; t: number | null; h: number | null; battery: number | null };
export type BatchListener = (rows: CommittedReading[]) => void | Promise<void>;
/**
 * `inserted`: rows new to the database. `conflicts`: readings whose sensor and time already held a
 * different value (the stored one is kept; a plain resend is no conflict). `outsideSpot`: inserted
 * rows that fall in no placement of their sensor, so no spot shows them (counted for write() only).
 */
export type WriteResult = { inserted: number; conflicts: number; outsideSpot: number; conflictsAt?: number[] };

/**
 * SQL for the instant the local hour containing `at` began: `at` minus the minutes and seconds past
 * the local hour. Rounding the local wall time and converting it back would be ambiguous in the hour
 * clocks go back (PostgreSQL reads the repeated wall time as the later instant, filing a reading
 * under an hour that starts after it).
 */
export const LOCAL_HOUR_START = (at: string, timeZone: string) =>
  `(${at} - ((${at} AT TIME ZONE ${timeZone}) - date_trunc('hour', ${at} AT TIME ZONE ${timeZone})))`;

/** An hour's readings with a dew-point margin and those under the condensation margin (a channel added to a stored row counts once). */
export const DP_COUNTS = (margin: string) =>
  `count(${margin})::int AS dp_n, (count(*) FILTER (WHERE ${margin} < ${CONDENSATION_MARGIN_C}))::int AS dp_under_n`;

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
  SELECT sensor_id, to_timestamp(ms / 1000) AS measured_at, temperature, humidity, lux, battery FROM unnest($1::int[], $2::float8[], $3::real[], $4::real[], $5::real[], $6::real[])
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
      merge ? `
    dew_point_margin(${calibratedSql("temperature", "f.t_row")}, ${calibratedSql("humidity", "f.h_row")}) AS dp,` : ""
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
), seen AS (${withSeen ? `
  UPDATE sensors s SET last_seen_at = greatest(s.last_seen_at, x.last_at),
    battery = coalesce(x.battery, s.battery)
  FROM (
    SELECT sensor_id, max(measured_at) AS last_at,
      (array_agg(battery ORDER BY measured_at DESC) FILTER (WHERE battery IS NOT NULL))[1] AS battery
    FROM input GROUP BY sensor_id
  ) x
  WHERE s.id = x.sensor_id AND (s.last_seen_at IS NULL OR x.last_at >= s.last_seen_at)
  RETURNING 1` : "SELECT 1 WHERE false"}
)${conflicts}
SELECT (SELECT count(*)::int FROM ins) AS inserted, (SELECT count(*)::int FROM up) AS hours,
  ${optimistic ? "NULL::json" : `(SELECT json_agg(json_build_array(sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint)) FROM conflicts)`} AS conflicts,
  ${withOutside ? "greatest(0, (SELECT count(*) FROM fresh) - (SELECT count(*) FROM placed))::int" : "0"} AS outside,
  (SELECT count(*)::int FROM seen) AS seen,
  ${withRows ? `coalesce((SELECT json_agg(json_build_array(spot_id, sensor_id, measured_at, t, h, battery) ORDER BY measured_at)
    FROM placed), '[]'::json)` : `'[]'::json`} AS placed`;
}

// The committed rows go back to the process only when someone listens (the alert engine). The
// sensor's last-seen time and battery are left out of the halves of a split batch (see
// splitStatements), which set them in a statement of their own.
const SQL = new Map<string, string>();
// `optimistic`: a plain INSERT, about half the cost of INSERT … ON CONFLICT DO NOTHING per row
// (no speculative insertion), tried first for batches without single-channel readings. The
// primary key still refuses any duplicate; the batch is then written with ON CONFLICT.
// `withOutside`: count inserted rows in no placement (write() callers are told; store() skips it).
type Variant = { merge: boolean; withRows: boolean; withKeys: boolean; withSeen: boolean; optimistic: boolean; withOutside: boolean };
/** The statement text of a variant, and a name to prepare it under. */
function sqlFor(v: Variant): { text: string; name: string } {
  const optimistic = v.optimistic && !v.merge;
  const name = `nw-write-${v.merge ? "m" : "p"}${v.withRows ? "r" : ""}${v.withKeys ? "k" : ""}${v.withSeen ? "s" : ""}${optimistic ? "o" : ""}${v.withOutside ? "c" : ""}`;
  let text = SQL.get(name);
  if (!text) SQL.set(name, (text = buildWriteSql({ ...v, optimistic }) + (v.withKeys ? KEYS : "")));
  return { text, name };
}
const UNIQUE_VIOLATION = "23505";
const isDuplicate = (err: unknown) => (err as { code?: string }).code === UNIQUE_VIOLATION;

/**
 * The write statement: first as a plain INSERT, and on a duplicate again with ON CONFLICT (inside
 * a transaction, after rolling back to a savepoint). Live batches (a few hundred readings, many a
 * second) run prepared: parsing and planning this statement costs about a millisecond, a tenth of
 * a small batch's commit; bulk batches keep a plan made for their size.
 */
async function writeStatement(client: pg.PoolClient, v: Omit<Variant, "optimistic">, cols: string[], opts: { prepared: boolean; inTransaction?: boolean }): Promise<StatementRow> {
  const run = (optimistic: boolean) => {
    const { text, name } = sqlFor({ ...v, optimistic });
    return client.query(opts.prepared ? { name, text, values: cols } : { text, values: cols });
  };
  if (v.merge) return (await run(false)).rows[0] as StatementRow;
  if (opts.inTransaction) await client.query("SAVEPOINT optimistic");
  try {
    return (await run(true)).rows[0] as StatementRow;
  } catch (err) {
    if (!isDuplicate(err)) throw err;
    if (opts.inTransaction) await client.query("ROLLBACK TO SAVEPOINT optimistic");
    return (await run(false)).rows[0] as StatementRow;
  }
}

// With several callers in one group commit, each needs to know which of its rows were new, and
// which of those fall in no placement (withKeys implies withOutside: some caller counts).
const KEYS = `,
  coalesce((SELECT json_agg(json_build_array(sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint)) FROM ins), '[]'::json) AS keys,
  coalesce((SELECT json_agg(json_build_array(f.sensor_id, (extract(epoch FROM f.measured_at) * 1000)::bigint)) FROM fresh f
    WHERE NOT EXISTS (SELECT 1 FROM placed p WHERE p.sensor_id = f.sensor_id AND p.measured_at = f.measured_at)), '[]'::json) AS outside_keys`;

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

// `counted`: the caller wants to know how many of its readings were new (see KEYS).
type Pending = { readings: Reading[]; counted: boolean; resolve: (r: WriteResult) => void; reject: (e: Error) => void };

type StatementRow = {
  inserted: number;
  conflicts: [number, number][] | null;
  outside: number;
  placed: [number, number, string, number | null, number | null, number | null][];
  keys?: [number, number][];
  outside_keys?: [number, number][];
};


// The seen update of a split batch, run by the later half after the earlier half committed.
const SEEN_SQL = `UPDATE sensors SET last_seen_at = greatest(last_seen_at, to_timestamp($2::float8 / 1000)), battery = coalesce($3::real, battery)
  WHERE id = $1 AND (last_seen_at IS NULL OR to_timestamp($2::float8 / 1000) >= last_seen_at)`;

const asError = (err: unknown) => (err instanceof Error ? err : new Error(String(err)));

/**
 * The statement's array parameters, built here as literals: node-pg's generic array and Date
 * serialisation cost more per row than the insert itself. Times travel as epoch milliseconds.
 */
function columns(rows: Reading[]): string[] {
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

/** Batches of at least this many readings of one sensor are written as two halves at once. */
const SPLIT_MIN_ROWS = 4000;
const SPLIT_LOCK_TIMEOUT_MS = 5_000;
/** Batches up to this size run as a prepared statement. */
const PREPARED_MAX_ROWS = 2500;
const HOUR_MS = 3_600_000;

/**
 * A batch of one sensor's readings cut in two by time so that no local hour of the sensor's site
 * (the rollups' key) has readings in both halves, or null when it can't be (several sensors, one
 * hour). The halves then share no row: two statements inserting the same new rollup would wait on
 * each other.
 */
function splitOneSensor(rows: Reading[], timeZone: string): [Reading[], Reading[]] | null {
  const ordered = [...rows].sort((a, b) => a.measuredAt.getTime() - b.measuredAt.getTime());
  const clock = zoneClock(timeZone);
  const hourOf = (r: Reading) => {
    const ms = r.measuredAt.getTime();
    return ms - ((((ms + clock.offsetAt(ms)) % HOUR_MS) + HOUR_MS) % HOUR_MS);
  };
  const middle = ordered.length >> 1;
  for (let step = 0; step < middle; step++) {
    for (const cut of [middle + step, middle - step]) {
      if (cut > 0 && cut < ordered.length && hourOf(ordered[cut]) !== hourOf(ordered[cut - 1])) return [ordered.slice(0, cut), ordered.slice(cut)];
    }
  }
  return null;
}


export type WriterStats = {
  batches: number;
  readings: number;
  inserted: number;
  failures: number;
  lastCommitMs: number;
  commitMs: number[]; // recent commit latencies, newest last
  /** Large one-sensor batches written as two halves at once. */
  splitBatches: number;
};

// Readings are split by sensor over a few independent queues ("shards"), each with one statement
// in flight at a time: two statements can commit at once (one parses while the other waits on
// disk), and no two statements in flight ever hold readings of the same sensor, which keeps the
// merging statement's before-image sound and the per-sensor order of commits.
type Shard = { pending: Pending[]; count: number; timer: NodeJS.Timeout | null; flushing: Promise<void> | null };

export class ReadingWriter {
  private shards: Shard[];
  private listeners = new Set<BatchListener>();
  readonly stats: WriterStats = { batches: 0, readings: 0, inserted: 0, failures: 0, lastCommitMs: 0, commitMs: [], splitBatches: 0 };

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

  /** Resolves after the readings are committed (or were already stored) with how many were new; rejects if they were not. */
  write(readings: Reading[]): Promise<WriteResult> {
    return this.route(readings, true);
  }

  /**
   * As `write`, for callers that need only the commit (the broker acks it): a group commit of
   * such callers alone skips listing the rows it inserted, so `inserted` and `outsideSpot` may
   * read 0; `conflicts` is always told.
   */
  store(readings: Reading[]): Promise<WriteResult> {
    return this.route(readings, false);
  }

  private route(readings: Reading[], counted: boolean): Promise<WriteResult> {
    if (readings.length === 0) return Promise.resolve({ inserted: 0, conflicts: 0, outsideSpot: 0 });
    const k = this.shards.length;
    const first = readings[0].sensorId % k;
    if (k === 1 || readings.every((r) => r.sensorId % k === first)) return this.enqueue(this.shards[first], readings, counted);
    const parts: Reading[][] = this.shards.map(() => []);
    for (const r of readings) parts[r.sensorId % k].push(r);
    return Promise.all(parts.map((part, i) => (part.length > 0 ? this.enqueue(this.shards[i], part, counted) : null))).then((rs) => {
      const sum: WriteResult = { inserted: 0, conflicts: 0, outsideSpot: 0 };
      for (const r of rs) {
        if (!r) continue;
        sum.inserted += r.inserted;
        sum.conflicts += r.conflicts;
        sum.outsideSpot += r.outsideSpot;
        if (r.conflictsAt) (sum.conflictsAt ??= []).push(...r.conflictsAt);
      }
      return sum;
    });
  }

  private enqueue(shard: Shard, readings: Reading[], counted: boolean): Promise<WriteResult> {
    return new Promise((resolve, reject) => {
      shard.pending.push({ readings, counted, resolve, reject });
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
    const rows: Reading[] = batch.length === 1 ? batch[0].readings : batch.flatMap((p) => p.readings);
    const merge = rows.some((r) => r.partial);
    const withRows = this.listeners.size > 0;
    // One caller is told the statement's own count; several need the inserted keys to share it out.
    const withOutside = batch.some((p) => p.counted);
    const withKeys = batch.length > 1 && withOutside;
    const started = performance.now();
    const halves = n >= SPLIT_MIN_ROWS ? await this.halves(rows) : null;
    let results: StatementRow[] = [];
    let failure: Error | null = null;
    if (halves) {
      ({ results, failure } = await this.splitStatements(halves, merge, withRows, withKeys, withOutside));
      // Nothing committed (a lock wait timed out, say): the batch gets one plain try.
      if (results.length === 0) failure = null;
      else this.stats.splitBatches++;
    }
    if (results.length === 0 && !failure) {
      try {
        results = [await this.statement(columns(rows), n, merge, withRows, withKeys, withOutside)];
      } catch (err) {
        failure = asError(err);
      }
    }
    const ms = performance.now() - started;
    if (results.length > 0) {
      this.stats.batches++;
      this.stats.readings += n;
      this.stats.lastCommitMs = ms;
      this.stats.commitMs.push(ms);
      if (this.stats.commitMs.length > 500) this.stats.commitMs.splice(0, this.stats.commitMs.length - 500);
    }
    for (const r of results) this.stats.inserted += r.inserted;
    // Committed rows reach the listeners even when a later half failed: they are stored, and the
    // retry that follows finds them already there.
    const placed = results.length === 1 ? results[0].placed : results.flatMap((r) => r.placed);
    if (this.listeners.size > 0 && placed.length > 0) {
      const committed = placed.map(([spotId, sensorId, at, t, h, battery]) => ({
        spotId, sensorId, measuredAt: new Date(at), t, h, battery,
      }));
      for (const l of this.listeners) {
        Promise.resolve()
          .then(() => l(committed))
          .catch((err) => console.error("[writer] batch listener failed:", err));
      }
    }
    if (failure) {
      this.stats.failures++;
      for (const p of batch) p.reject(failure);
      return;
    }
    // Conflicts are rare: the set of their keys is built only when there are some.
    let conflicting: Set<string> | null = null;
    for (const r of results) {
      if (!r.conflicts) continue;
      conflicting ??= new Set();
      for (const [id, ms] of r.conflicts) conflicting.add(`${id}:${ms}`);
    }
    if (batch.length === 1) {
      let inserted = 0;
      let outsideSpot = 0;
      for (const r of results) {
        inserted += r.inserted;
        outsideSpot += r.outside;
      }
      batch[0].resolve(conflicting ? { inserted, conflicts: conflicting.size, outsideSpot, conflictsAt: [...conflicting].map((k) => Number(k.split(":")[1])) } : { inserted, conflicts: 0, outsideSpot });
      return;
    }
    const fresh = withKeys ? new Set(results.flatMap((r) => r.keys ?? []).map(([id, ms]) => `${id}:${ms}`)) : null;
    const outside = withKeys ? new Set(results.flatMap((r) => r.outside_keys ?? []).map(([id, ms]) => `${id}:${ms}`)) : null;
    for (const p of batch) {
      let inserted = 0;
      let conflicts = 0;
      let outsideSpot = 0;
      let conflictsAt: number[] | undefined;
      if (fresh || conflicting) {
        for (const r of p.readings) {
          const key = `${r.sensorId}:${r.measuredAt.getTime()}`;
          if (fresh?.delete(key)) {
            inserted++;
            if (outside!.delete(key)) outsideSpot++;
          }
          if (conflicting?.has(key)) {
            conflicts++;
            (conflictsAt ??= []).push(r.measuredAt.getTime());
          }
        }
      }
      // store() callers without keys are told only their conflicts: nobody reads their count.
      p.resolve(conflictsAt ? { inserted, conflicts, outsideSpot, conflictsAt } : { inserted, conflicts, outsideSpot });
    }
  }

  /** A large one-sensor batch in two halves by local hour, or null to write it whole. */
  private async halves(rows: Reading[]): Promise<[Reading[], Reading[]] | null> {
    const sensorId = rows[0].sensorId;
    if (rows.some((r) => r.sensorId !== sensorId)) return null;
    try {
      const info = await sensorInfo(sensorId);
      return info ? splitOneSensor(rows, info.timeZone) : null;
    } catch {
      return null; // the whole statement will report what is wrong
    }
  }

  /** One statement, its own transaction: it has committed when the result comes back. */
  private async statement(cols: string[], rows: number, merge: boolean, withRows: boolean, withKeys: boolean, withOutside: boolean): Promise<StatementRow> {
    const client = await this.getPool().connect();
    try {
      const row = await writeStatement(client, { merge, withRows, withKeys, withSeen: true, withOutside }, cols, { prepared: rows <= PREPARED_MAX_ROWS });
      client.release();
      return row;
    } catch (err) {
      client.release(true);
      throw err;
    }
  }

  /**
   * A large batch of one sensor (backfill, CSV, HTTP) as two statements running at once on two
   * connections, so PostgreSQL works on both cores. The earlier half commits on its own; the later
   * half waits in its transaction and commits only after the earlier one has, so the sensor's
   * readings still commit in time order (the alert engine needs that) and a failed earlier half
   * takes the later one with it. The halves share no row (see splitOneSensor; the sensor's row is
   * updated by the later half after the earlier committed). A lock timeout breaks a wait that a
   * third writer, sharing a spot's rollups with both halves, could otherwise close into a cycle.
   */
  private async splitStatements(halves: [Reading[], Reading[]], merge: boolean, withRows: boolean, withKeys: boolean, withOutside: boolean): Promise<{ results: StatementRow[]; failure: Error | null }> {
    const variant = { merge, withRows, withKeys, withSeen: false, withOutside };
    // What the whole batch says about the sensor, set once the earlier half has committed.
    const [earlierRows, laterRows] = halves;
    const lastMs = laterRows[laterRows.length - 1].measuredAt.getTime();
    const hasBattery = (r: Reading) => r.battery !== null && r.battery !== undefined;
    const battery = (laterRows.findLast(hasBattery) ?? earlierRows.findLast(hasBattery))?.battery ?? null;
    const run = async (rows: Reading[], waitFor: Promise<unknown> | null) => {
      const client = await this.getPool().connect();
      let row: StatementRow;
      try {
        await client.query(`BEGIN; SET LOCAL lock_timeout = '${SPLIT_LOCK_TIMEOUT_MS}ms'`);
        row = await writeStatement(client, variant, columns(rows), { prepared: false, inTransaction: true });
      } catch (err) {
        client.release(true);
        throw err;
      }
      const earlierFailed = waitFor ? await waitFor.then(() => null, asError) : null;
      try {
        if (waitFor && !earlierFailed) await client.query(SEEN_SQL, [rows[0].sensorId, lastMs, battery]);
        await client.query(earlierFailed ? "ROLLBACK" : "COMMIT");
      } catch (err) {
        client.release(true);
        throw err;
      }
      client.release();
      if (earlierFailed) throw earlierFailed;
      return row;
    };
    const earlier = run(halves[0], null);
    const later = run(halves[1], earlier);
    const [a, b] = await Promise.allSettled([earlier, later]);
    if (a.status === "rejected") return { results: [], failure: asError(a.reason) };
    if (b.status === "rejected") return { results: [a.value], failure: asError(b.reason) };
    return { results: [a.value, b.value], failure: null };
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

// Beside its one use, so that the SQL builder's move above merges cleanly.
import { kept } from "~/.server/kept";

type Holder = { writer?: ReadingWriter };
const holder = kept<Holder>("writer", () => ({}));

/** The process's writer: shared by the broker, the HTTP route and CSV import. */
export function writer(): ReadingWriter {
  holder.writer ??= new ReadingWriter();
  return holder.writer;
}
