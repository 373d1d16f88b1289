// CSV import through the same writer as live ingest: preview and import of a sensor's readings from
// a file that csv-file.ts reads (limits on the raw bytes and the line count before the parser sees
// it); a file imported twice adds nothing the second time.
//
// One process serves the web, the broker and the alerts, so a million-row file must neither
// freeze it nor bloat it: the file is parsed in 32 KB slices straight from its bytes, each slice's
// rows converted and handed on before the next, with a turn of the event loop between slices; no
// pass holds more than one write batch of rows. At most two previews or imports run at once, one
// per user (csvSlot).
import { rowToReading, type CsvMapping } from "~/domain/ingest/csv";
import type { Reading, SpotKindForLimits } from "~/domain/ingest/payload";
import { WallClockReader, type DstChange } from "~/lib/time";
import { db, pool } from "~/.server/db";
import { auditLog } from "~/db/schema.server";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import { sensorInfo } from "~/.server/ingest/sensor-cache";
import { writer, type WriteResult } from "~/.server/ingest/writer";
import { rowsOf, type CsvHead, type CsvRow, type CsvSource } from "~/.server/ingest/csv-file";

type Failure = { line: number; reason: string; row: string[] };
type Conversion = { now: Date; kind: SpotKindForLimits; clock: WallClockReader };

async function conversion(sensorId: number, mapping: CsvMapping): Promise<Conversion> {
  const info = await sensorInfo(sensorId);
  return { now: new Date(), kind: info?.kind ?? "unplaced", clock: new WallClockReader(mapping.timeZone) };
}

/** The sensor's placements as [from, to) in ms, oldest first. */
async function placementSpans(sensorId: number): Promise<[number, number][]> {
  const { rows } = await pool().query<{ from_at: Date; to_at: Date | null }>(
    "SELECT from_at, to_at FROM placements WHERE sensor_id = $1 ORDER BY from_at",
    [sensorId],
  );
  return rows.map((r) => [r.from_at.getTime(), r.to_at?.getTime() ?? Infinity]);
}

/** Counts readings at times when the sensor was in no spot (no page shows those). */
class SpotCoverage {
  outside = 0;
  beforeFirst = 0;
  earliestOutside: number | null = null;
  constructor(private readonly spans: [number, number][]) {}
  add(ms: number) {
    const spans = this.spans;
    // Files are in time order, so the span that held the last reading is tried first.
    if (this.last >= 0 && ms >= spans[this.last][0] && ms < spans[this.last][1]) return;
    for (let i = 0; i < spans.length; i++) {
      if (ms >= spans[i][0] && ms < spans[i][1]) {
        this.last = i;
        return;
      }
    }
    this.outside++;
    if (spans.length === 0 || ms < spans[0][0]) this.beforeFirst++;
    if (this.earliestOutside === null || ms < this.earliestOutside) this.earliestOutside = ms;
  }
  private last = -1;
}

export type PreviewRow = { line: number; reading: Reading };

export type CsvPreview = {
  rows: number;
  valid: number;
  failed: number;
  /** The first valid rows with their lines in the file. */
  sample: PreviewRow[];
  firstFailures: { line: number; reason: string }[];
  /** How rows at the clock changes were read. */
  dstChanges: DstChange[];
  /** Valid rows at times when the sensor was in no spot; those before its first placement. */
  outsideSpots: number;
  beforeFirstPlacement: number;
  earliestOutside: Date | null;
};

/** A pass over the whole file without writing: what an import would store, and where. */
export async function previewCsv(
  source: CsvSource,
  mapping: CsvMapping,
  sensorId: number,
  opts: { head?: CsvHead; sample?: number } = {},
): Promise<CsvPreview> {
  const ctx = await conversion(sensorId, mapping);
  const coverage = new SpotCoverage(await placementSpans(sensorId));
  const sampleSize = opts.sample ?? 10;
  const sample: PreviewRow[] = [];
  const firstFailures: { line: number; reason: string }[] = [];
  let rows = 0,
    valid = 0,
    failed = 0;
  for await (const batch of rowsOf(source, opts.head)) {
    for (const row of batch) {
      rows++;
      const r = rowToReading(row.cells, mapping, sensorId, ctx);
      if (r.ok) {
        valid++;
        coverage.add(r.reading.measuredAt.getTime());
        if (sample.length < sampleSize) sample.push({ line: row.line, reading: r.reading });
      } else if (failed++ < sampleSize) firstFailures.push({ line: row.line, reason: r.reason });
    }
  }
  return {
    rows,
    valid,
    failed,
    sample,
    firstFailures,
    dstChanges: [...ctx.clock.changes.values()],
    outsideSpots: coverage.outside,
    beforeFirstPlacement: coverage.beforeFirst,
    earliestOutside: coverage.earliestOutside === null ? null : new Date(coverage.earliestOutside),
  };
}

/** The first `limit` rows as readings or failures (kept for callers that hold the rows). */
export async function convertRows(rows: string[][], mapping: CsvMapping, sensorId: number, limit = Infinity) {
  const ctx = await conversion(sensorId, mapping);
  const ok: Reading[] = [];
  const failed: Failure[] = [];
  for (let i = 0; i < Math.min(rows.length, limit); i++) {
    const r = rowToReading(rows[i], mapping, sensorId, ctx);
    if (r.ok) ok.push(r.reading);
    else failed.push({ line: i + 2, reason: r.reason, row: rows[i] });
  }
  return { ok, failed };
}

// 5,000 rather than 10,000: each batch's readings live until PostgreSQL has them, and half the
// batch halved the process's RSS growth over a million-row import (npm run bench).
const IMPORT_BATCH = 5_000;

/**
 * Writes the valid rows in batches of 5,000, each converted while the one before it is being
 * written: converting is this process's work and writing is PostgreSQL's, so the two overlap. A
 * batch that cannot be written (the database gone, say) stops the import there, and the result
 * says at which line: the batches before it stay stored, and importing the file again adds only
 * what is missing.
 */
export async function importCsv(
  source: CsvSource,
  mapping: CsvMapping,
  sensorId: number,
  opts: { head?: CsvHead } = {},
) {
  const ctx = await conversion(sensorId, mapping);
  const coverage = new SpotCoverage(await placementSpans(sensorId));
  const firstFailures: Failure[] = [];
  let rows = 0;
  let failed = 0;
  let valid = 0;
  let written = 0; // valid rows in batches that committed
  let stored = 0;
  let conflicts = 0;
  let stopped = null as { line: number; reason: string } | null;
  let writing: { result: Promise<WriteResult>; rows: number; line: number } | null = null;
  const settle = async () => {
    if (!writing) return;
    const w = writing;
    writing = null;
    try {
      const result = await w.result;
      stored += result.inserted;
      conflicts += result.conflicts;
      written += w.rows;
    } catch (err) {
      console.error(`[csv] import for sensor ${sensorId} stopped at line ${w.line}:`, err);
      stopped = { line: w.line, reason: err instanceof Error ? err.message : String(err) };
    }
  };
  let pending: Reading[] = [];
  let pendingLine = 0;
  const flush = async () => {
    await settle();
    if (!stopped && pending.length > 0)
      writing = { result: writer().write(pending), rows: pending.length, line: pendingLine };
    pending = [];
  };
  let lastLine = 1;
  try {
    for await (const batch of rowsOf(source, opts.head)) {
      // Once a batch is refused the rest is only counted, for the answer's "of N rows".
      if (stopped) {
        rows += batch.length;
        continue;
      }
      await convertBatch(batch);
    }
  } catch (err) {
    // The file itself breaks off (the preview would have said so): what came before is written.
    await flush();
    stopped ??= {
      line: lastLine + 1,
      reason: `the file could not be read as CSV from there: ${(err as Error).message}`,
    };
  }
  async function convertBatch(batch: CsvRow[]) {
    for (const row of batch) {
      lastLine = row.line;
      rows++;
      const r = rowToReading(row.cells, mapping, sensorId, ctx);
      if (r.ok) {
        if (pending.length === 0) pendingLine = row.line;
        pending.push(r.reading);
        valid++;
        coverage.add(r.reading.measuredAt.getTime());
      } else if (failed++ < 50) firstFailures.push({ line: row.line, reason: r.reason, row: row.cells });
      if (pending.length >= IMPORT_BATCH) await flush();
    }
  }
  await flush();
  await settle();
  recordRejectionsSoon(
    firstFailures.map((f) => ({
      sensorId,
      source: "csv" as const,
      reason: f.reason,
      payload: f.row.join(",").slice(0, 300),
    })),
  );
  return {
    rows,
    valid,
    stored,
    duplicates: written - stored - conflicts,
    /** Rows whose time already held a different value for this sensor: the stored one is kept. */
    conflicts,
    failed,
    firstFailures: firstFailures.slice(0, 20),
    stopped,
    /** Valid rows of this file at times when the sensor was in no spot: stored, but on no page. */
    outsideSpots: coverage.outside,
    dstChanges: [...ctx.clock.changes.values()],
  };
}

export type CsvImportResult = Awaited<ReturnType<typeof importCsv>>;

// At most this many previews and imports at once in the process, and one per user.
export const CSV_MAX_RUNNING = 2;
const running = new Set<string>();

/** A turn to preview or import, or null when the user already has one or the server has two. */
export function csvSlot(userKey: string): (() => void) | null {
  if (running.has(userKey) || running.size >= CSV_MAX_RUNNING) return null;
  running.add(userKey);
  return () => running.delete(userKey);
}

/** One audit row per import: who imported how much into which sensor. */
export async function auditCsvImport(opts: {
  siteId: number;
  actorId: number;
  sensorId: number;
  sensorName: string;
  result: CsvImportResult;
}) {
  const { rows, stored, duplicates, failed, outsideSpots, stopped } = opts.result;
  await db()
    .insert(auditLog)
    .values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "csv.import",
      detail: {
        sensorId: opts.sensorId,
        sensor: opts.sensorName,
        rows,
        stored,
        duplicates,
        failed,
        outsideSpots,
        stoppedAtLine: stopped?.line ?? null,
      },
    });
}
