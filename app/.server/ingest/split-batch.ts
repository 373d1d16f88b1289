// Large batches of one sensor (backfill, CSV, HTTP) written as two halves at once, on two
// connections, so PostgreSQL works on both cores; the writer hands them here (see SPLIT_MIN_ROWS).
import type pg from "pg";
import { sensorInfo } from "~/.server/ingest/sensor-cache";
import { columns, SEEN_SQL } from "~/.server/ingest/write-sql";
import { asError, writeStatement, type StatementRow } from "~/.server/ingest/write-statement";
import type { Reading } from "~/domain/ingest/payload";
import { zoneClock } from "~/domain/season/local-time";

/** Batches of at least this many readings of one sensor are written as two halves at once. */
export const SPLIT_MIN_ROWS = 4000;
const SPLIT_LOCK_TIMEOUT_MS = 5_000;
const HOUR_MS = 3_600_000;

/**
 * A batch of one sensor's readings cut in two by time so that no local hour of the sensor's site
 * (the rollups' key) has readings in both halves, or null when it can't be (several sensors, one
 * hour). The halves then share no row: two statements inserting the same new rollup would wait on
 * each other.
 */
export function splitOneSensor(rows: Reading[], timeZone: string): [Reading[], Reading[]] | null {
  const ordered = [...rows].sort((a, b) => a.measuredAt.getTime() - b.measuredAt.getTime());
  const clock = zoneClock(timeZone);
  const hourOf = (r: Reading) => {
    const ms = r.measuredAt.getTime();
    return ms - ((((ms + clock.offsetAt(ms)) % HOUR_MS) + HOUR_MS) % HOUR_MS);
  };
  const middle = ordered.length >> 1;
  for (let step = 0; step < middle; step++) {
    for (const cut of [middle + step, middle - step]) {
      if (cut > 0 && cut < ordered.length && hourOf(ordered[cut]) !== hourOf(ordered[cut - 1]))
        return [ordered.slice(0, cut), ordered.slice(cut)];
    }
  }
  return null;
}

/** A large one-sensor batch in two halves by local hour, or null to write it whole. */
export async function halvesOf(rows: Reading[]): Promise<[Reading[], Reading[]] | null> {
  const sensorId = rows[0].sensorId;
  if (rows.some((r) => r.sensorId !== sensorId)) return null;
  try {
    const info = await sensorInfo(sensorId);
    return info ? splitOneSensor(rows, info.timeZone) : null;
  } catch {
    return null; // the whole statement will report what is wrong
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
export async function writeInHalves(
  getPool: () => pg.Pool,
  halves: [Reading[], Reading[]],
  merge: boolean,
  withRows: boolean,
  withKeys: boolean,
  withOutside: boolean,
): Promise<{ results: StatementRow[]; failure: Error | null }> {
  const variant = { merge, withRows, withKeys, withSeen: false, withOutside };
  // What the whole batch says about the sensor, set once the earlier half has committed.
  const [earlierRows, laterRows] = halves;
  const lastMs = laterRows[laterRows.length - 1].measuredAt.getTime();
  const hasBattery = (r: Reading) => r.battery !== null && r.battery !== undefined;
  const battery = (laterRows.findLast(hasBattery) ?? earlierRows.findLast(hasBattery))?.battery ?? null;
  const run = async (rows: Reading[], waitFor: Promise<unknown> | null) => {
    const client = await getPool().connect();
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
