// CSV import through the same writer as live ingest. Limits are checked on the raw bytes and the
// line count before the parser sees the file; a file imported twice adds nothing the second time.
import { parse } from "csv-parse/sync";
import { CSV_MAX_BYTES, CSV_MAX_ROWS, guessDelimiter, rowToReading, type CsvMapping } from "~/domain/ingest/csv";
import type { Reading } from "~/domain/ingest/payload";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import { sensorInfo } from "~/.server/ingest/sensors";
import { writer } from "~/.server/ingest/writer";

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

export async function convertRows(rows: string[][], mapping: CsvMapping, sensorId: number, limit = Infinity) {
  const info = await sensorInfo(sensorId);
  const kind = info?.kind ?? "unplaced";
  const now = new Date();
  const ok: Reading[] = [];
  const failed: { line: number; reason: string; row: string[] }[] = [];
  const n = Math.min(rows.length, limit);
  for (let i = 0; i < n; i++) {
    const r = rowToReading(rows[i], mapping, sensorId, { now, kind });
    if (r.ok) ok.push(r.reading);
    else failed.push({ line: i + 2, reason: r.reason, row: rows[i] });
  }
  return { ok, failed };
}

export async function importCsv(rows: string[][], mapping: CsvMapping, sensorId: number) {
  const { ok, failed } = await convertRows(rows, mapping, sensorId);
  let stored = 0;
  for (let i = 0; i < ok.length; i += 10_000) {
    stored += (await writer().write(ok.slice(i, i + 10_000))).inserted;
  }
  recordRejectionsSoon(
    failed.slice(0, 50).map((f) => ({ sensorId, source: "csv" as const, reason: f.reason, payload: f.row.join(",").slice(0, 300) })),
  );
  return { rows: rows.length, valid: ok.length, stored, duplicates: ok.length - stored, failed: failed.length, firstFailures: failed.slice(0, 20) };
}
