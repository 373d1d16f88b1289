// The one path every reading takes into PostgreSQL. Readings from all connections are grouped for
// a few milliseconds and written in one transaction: raw rows deduplicated on (sensor, measured_at),
// and the hourly rollups of the spot each sensor was placed in, counting only rows really inserted.
// A caller's promise resolves only after COMMIT, which is what lets MQTT ack after commit.
import { halvesOf, SPLIT_MIN_ROWS, writeInHalves } from "~/.server/ingest/split-batch";
import { columns } from "~/.server/ingest/write-sql";
import { asError, writeStatement, type StatementRow } from "~/.server/ingest/write-statement";
import type pg from "pg";
import { pool } from "~/.server/db";
import type { Reading } from "~/domain/ingest/payload";

export type CommittedReading = {
  spotId: number;
  sensorId: number;
  measuredAt: Date;
  t: number | null;
  h: number | null;
  battery: number | null;
};
export type BatchListener = (rows: CommittedReading[]) => void | Promise<void>;
/**
 * `inserted`: rows new to the database. `conflicts`: readings whose sensor and time already held a
 * different value (the stored one is kept; a plain resend is no conflict). `outsideSpot`: inserted
 * rows that fall in no placement of their sensor, so no spot shows them (counted for write() only).
 */
export type WriteResult = { inserted: number; conflicts: number; outsideSpot: number; conflictsAt?: number[] };

// `counted`: the caller wants to know how many of its readings were new (see KEYS in write-sql.ts).
type Pending = { readings: Reading[]; counted: boolean; resolve: (r: WriteResult) => void; reject: (e: Error) => void };

/** Batches up to this size run as a prepared statement. */
const PREPARED_MAX_ROWS = 2500;

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
  readonly stats: WriterStats = {
    batches: 0,
    readings: 0,
    inserted: 0,
    failures: 0,
    lastCommitMs: 0,
    commitMs: [],
    splitBatches: 0,
  };

  constructor(
    private readonly getPool: () => pg.Pool = pool,
    readonly flushMs = 5,
    readonly maxBatch = 2000,
    shardCount = 2,
  ) {
    this.shards = Array.from({ length: Math.max(1, shardCount) }, () => ({
      pending: [],
      count: 0,
      timer: null,
      flushing: null,
    }));
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
    if (k === 1 || readings.every((r) => r.sensorId % k === first))
      return this.enqueue(this.shards[first], readings, counted);
    const parts: Reading[][] = this.shards.map(() => []);
    for (const r of readings) parts[r.sensorId % k].push(r);
    return Promise.all(
      parts.map((part, i) => (part.length > 0 ? this.enqueue(this.shards[i], part, counted) : null)),
    ).then((rs) => {
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
    const halves = n >= SPLIT_MIN_ROWS ? await halvesOf(rows) : null;
    let results: StatementRow[] = [];
    let failure: Error | null = null;
    if (halves) {
      ({ results, failure } = await writeInHalves(this.getPool, halves, merge, withRows, withKeys, withOutside));
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
        spotId,
        sensorId,
        measuredAt: new Date(at),
        t,
        h,
        battery,
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
      batch[0].resolve(
        conflicting
          ? {
              inserted,
              conflicts: conflicting.size,
              outsideSpot,
              conflictsAt: [...conflicting].map((k) => Number(k.split(":")[1])),
            }
          : { inserted, conflicts: 0, outsideSpot },
      );
      return;
    }
    const fresh = withKeys ? new Set(results.flatMap((r) => r.keys ?? []).map(([id, ms]) => `${id}:${ms}`)) : null;
    const outside = withKeys
      ? new Set(results.flatMap((r) => r.outside_keys ?? []).map(([id, ms]) => `${id}:${ms}`))
      : null;
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

  /** One statement, its own transaction: it has committed when the result comes back. */
  private async statement(
    cols: string[],
    rows: number,
    merge: boolean,
    withRows: boolean,
    withKeys: boolean,
    withOutside: boolean,
  ): Promise<StatementRow> {
    const client = await this.getPool().connect();
    try {
      const row = await writeStatement(client, { merge, withRows, withKeys, withSeen: true, withOutside }, cols, {
        prepared: rows <= PREPARED_MAX_ROWS,
      });
      client.release();
      return row;
    } catch (err) {
      client.release(true);
      throw err;
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

// Beside its one use, so that the SQL builder's move above merges cleanly.
import { kept } from "~/.server/kept";

type Holder = { writer?: ReadingWriter };
const holder = kept<Holder>("writer", () => ({}));

/** The process's writer: shared by the broker, the HTTP route and CSV import. */
export function writer(): ReadingWriter {
  holder.writer ??= new ReadingWriter();
  return holder.writer;
}
