// CSV import through the same writer as live ingest. Limits are checked on the raw bytes and the
// line count before the parser sees the file; a file imported twice adds nothing the second time.
import { parse } from "csv-parse/sync";
import { CSV_MAX_BYTES, CSV_MAX_ROWS, guessDelimiter, rowToReading, type CsvMapping } from "~/domain/ingest/csv";
import type { Reading, SpotKindForLimits } from "~/domain/ingest/payload";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import { sensorInfo } from "~/.server/ingest/sensors";
import { writer, type WriteResult } from "~/.server/ingest/writer";

export class CsvLimitError extends Error {}

export function checkLimits(bytes: Uint8Array) {
  if (bytes.byteLength > CSV_MAX_BYTES) throw new CsvLimitError(`The file is over ${CSV_MAX_BYTES / 1024 / 1024} MB; split it and import the parts.`);
  let lines = 0;
  for (let i = 0; i < bytes.length; i++) if (bytes[i] === 10) lines++;
  if (lines > CSV_MAX_ROWS + 1) throw new CsvLimitError(`The file has over ${CSV_MAX_ROWS.toLocaleString("en")} rows; split it and import the parts.`);
}

export function parseCsv(bytes: Uint8Array): { headers: string[]; rows: string[][] } {
  checkLimits(bytes);
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    text = new TextDecoder("latin1").decode(bytes);
  }
  text = text.replace(/^\uFEFF/, "");
  const firstLine = text.slice(0, text.search(/\r?\n|\r/) >>> 0 || text.length);
  const records = parse(text, {
    delimiter: guessDelimiter(firstLine),
    relax_column_count: true,
    relax_quotes: true,
    skip_empty_lines: true,
    trim: true,
    record_delimiter: ["\r\n", "\n", "\r"],
  }) as string[][];
  if (records.length === 0) return { headers: [], rows: [] };
  const looksLikeHeader = records[0].some((c) => /[a-z]/i.test(c) && !/^\d{1,4}[-/.]\d/.test(c));
  return looksLikeHeader
    ? { headers: records[0], rows: records.slice(1) }
    : { headers: records[0].map((_c, i) => `Column ${i + 1}`), rows: records };
}

type Failure = { line: number; reason: string; row: string[] };
type Conversion = { now: Date; kind: SpotKindForLimits };

async function conversion(sensorId: number): Promise<Conversion> {
  const info = await sensorInfo(sensorId);
  return { now: new Date(), kind: info?.kind ?? "unplaced" };
}

/** Rows `from`..`to` as readings; a failure's line counts the header as line 1. */
function convertRange(rows: string[][], from: number, to: number, mapping: CsvMapping, sensorId: number, ctx: Conversion, onFailure: (f: Failure) => void) {
  const ok: Reading[] = [];
  for (let i = from; i < to; i++) {
    const r = rowToReading(rows[i], mapping, sensorId, ctx);
    if (r.ok) ok.push(r.reading);
    else onFailure({ line: i + 2, reason: r.reason, row: rows[i] });
  }
  return ok;
}

export async function convertRows(rows: string[][], mapping: CsvMapping, sensorId: number, limit = Infinity) {
  const failed: Failure[] = [];
  const ok = convertRange(rows, 0, Math.min(rows.length, limit), mapping, sensorId, await conversion(sensorId), (f) => failed.push(f));
  return { ok, failed };
}

const IMPORT_BATCH = 10_000;

/**
 * Writes the valid rows in batches of 10,000, each converted while the one before it is being
 * written: converting is this process's work and writing is PostgreSQL's, so the two overlap. A
 * batch that cannot be written (the database gone, say) stops the import there, and the result
 * says at which line: the batches before it stay stored, and importing the file again adds only
 * what is missing.
 */
export async function importCsv(rows: string[][], mapping: CsvMapping, sensorId: number) {
  const ctx = await conversion(sensorId);
  const firstFailures: Failure[] = [];
  let failed = 0;
  let valid = 0;
  let written = 0; // valid rows in batches that committed
  let stored = 0;
  let stopped = null as { line: number; reason: string } | null;
  let writing: { result: Promise<WriteResult>; rows: number; line: number } | null = null;
  const settle = async () => {
    if (!writing) return;
    const w = writing;
    writing = null;
    try {
      stored += (await w.result).inserted;
      written += w.rows;
    } catch (err) {
      console.error(`[csv] import for sensor ${sensorId} stopped at line ${w.line}:`, err);
      stopped = { line: w.line, reason: err instanceof Error ? err.message : String(err) };
    }
  };
  for (let i = 0; i < rows.length && !stopped; i += IMPORT_BATCH) {
    const ok = convertRange(rows, i, Math.min(rows.length, i + IMPORT_BATCH), mapping, sensorId, ctx, (f) => {
      if (failed++ < 50) firstFailures.push(f);
    });
    valid += ok.length;
    await settle();
    if (!stopped && ok.length > 0) writing = { result: writer().write(ok), rows: ok.length, line: i + 2 };
  }
  await settle();
  recordRejectionsSoon(
    firstFailures.map((f) => ({ sensorId, source: "csv" as const, reason: f.reason, payload: f.row.join(",").slice(0, 300) })),
  );
  return { rows: rows.length, valid, stored, duplicates: written - stored, failed, firstFailures: firstFailures.slice(0, 20), stopped };
}
