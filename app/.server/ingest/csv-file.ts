// Reading a CSV file without freezing or bloating the server: the size and line limits checked
// on the raw bytes before the parser sees them, the encoding (UTF-8, else Latin-1), the first
// record (header or data), and the records in 32 KB slices with a turn of the event loop between.
// What the rows mean (a sensor's readings) is csv-import.ts's business.
import { isUtf8 } from "node:buffer";
import { setImmediate as nextTurn } from "node:timers/promises";
import { CsvError, Parser } from "csv-parse";
import { parse } from "csv-parse/sync";
import { CSV_MAX_BYTES, CSV_MAX_ROWS, guessDelimiter } from "~/domain/ingest/csv";

export class CsvLimitError extends Error {}

/** An error in the file itself (a quote never closed, a row too long), not in the server. */
export const isCsvFileError = (err: unknown): err is Error => err instanceof CsvError || err instanceof CsvLimitError;

const tooBig = () =>
  new CsvLimitError(`The file is over ${CSV_MAX_BYTES / 1024 / 1024} MB; split it and import the parts.`);
const tooManyRows = () =>
  new CsvLimitError(`The file has over ${CSV_MAX_ROWS.toLocaleString("en")} rows; split it and import the parts.`);

export function checkLimits(bytes: Uint8Array) {
  if (bytes.byteLength > CSV_MAX_BYTES) throw tooBig();
  let lines = 0;
  for (let i = bytes.indexOf(10); i !== -1; i = bytes.indexOf(10, i + 1)) lines++;
  if (lines > CSV_MAX_ROWS + 1) throw tooManyRows();
}

const CHECK_CHUNK = 1024 * 1024;

/**
 * The limits and the encoding, a megabyte at a time with a turn of the event loop between: the
 * whole 20 MB at once held the loop for about 50 ms. Each piece ends before a UTF-8 lead byte, so
 * the pieces validate on their own.
 */
async function inspect(bytes: Uint8Array): Promise<Encoding> {
  if (bytes.byteLength > CSV_MAX_BYTES) throw tooBig();
  let lines = 0;
  let utf8 = true;
  for (let start = 0; start < bytes.byteLength;) {
    let end = Math.min(bytes.byteLength, start + CHECK_CHUNK);
    while (end < bytes.byteLength && end > start && (bytes[end] & 0xc0) === 0x80) end--;
    for (let i = start; i < end; i++) if (bytes[i] === 10) lines++;
    if (lines > CSV_MAX_ROWS + 1) throw tooManyRows();
    if (utf8) utf8 = isUtf8(bytes.subarray(start, end));
    start = end;
    await nextTurn();
  }
  return utf8 ? "utf8" : "latin1";
}

const PARSE_OPTIONS = {
  // A logger's row is a few dozen characters: a "row" of megabytes is not one, and is refused.
  max_record_size: 64 * 1024,
  relax_column_count: true,
  relax_quotes: true,
  skip_empty_lines: true,
  trim: true,
  record_delimiter: ["\r\n", "\n", "\r"],
};

export type Encoding = "utf8" | "latin1";

const SLICE = 32 * 1024;

/** The first line's text (for the delimiter), the encoding, and whether the first record is a header. */
export type CsvHead = { headers: string[]; hasHeader: boolean; delimiter: string; encoding: Encoding; bom: boolean };

const looksLikeHeader = (record: string[]) => record.some((c) => /[a-z]/i.test(c) && !/^\d{1,4}[-/.]\d/.test(c));

/** Checks the file's limits and reads its first record, without parsing the rest. */
export async function readCsvHead(bytes: Uint8Array): Promise<CsvHead> {
  return headOf(bytes, await inspect(bytes));
}

function headOf(bytes: Uint8Array, encoding: Encoding): CsvHead {
  const bom = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf;
  const start = bom ? 3 : 0;
  const probe = Buffer.from(
    bytes.buffer,
    bytes.byteOffset + start,
    Math.min(bytes.byteLength - start, 64 * 1024),
  ).toString(encoding);
  const firstLine = probe.slice(0, probe.search(/\r?\n|\r/) >>> 0 || probe.length);
  const delimiter = guessDelimiter(firstLine);
  let first: string[] | null = null;
  const parser = newParser(delimiter, encoding);
  for (let at = start; at < bytes.byteLength && first === null; at += SLICE) {
    const err = parser.api.parse(
      Buffer.from(bytes.buffer, bytes.byteOffset + at, Math.min(SLICE, bytes.byteLength - at)),
      false,
      (r) => (first ??= r),
      () => {},
    );
    if (err) throw err;
  }
  if (first === null)
    parser.api.parse(
      undefined,
      true,
      (r) => (first ??= r),
      () => {},
    );
  if (first === null) return { headers: [], hasHeader: false, delimiter, encoding, bom };
  const head: string[] = first;
  return looksLikeHeader(head)
    ? { headers: head, hasHeader: true, delimiter, encoding, bom }
    : { headers: head.map((_c, i) => `Column ${i + 1}`), hasHeader: false, delimiter, encoding, bom };
}

// csv-parse's push API (what its stream calls for each chunk), used directly so that a slice's
// records come back synchronously and nothing queues inside a stream.
type PushParser = {
  api: {
    parse(buf: Buffer | undefined, end: boolean, push: (r: string[]) => void, close: () => void): Error | undefined;
    info: { lines: number };
  };
};

function newParser(delimiter: string, encoding: Encoding): PushParser {
  return new Parser({ ...PARSE_OPTIONS, delimiter, encoding }) as unknown as PushParser;
}

/** The whole file in memory, for tests and small files; imports read the bytes with `importCsv`. */
export function parseCsv(bytes: Uint8Array): { headers: string[]; rows: string[][] } {
  checkLimits(bytes);
  const head = headOf(bytes, isUtf8(bytes) ? "utf8" : "latin1");
  const text = Buffer.from(
    bytes.buffer,
    bytes.byteOffset + (head.bom ? 3 : 0),
    bytes.byteLength - (head.bom ? 3 : 0),
  ).toString(head.encoding);
  const records = parse(text, { ...PARSE_OPTIONS, delimiter: head.delimiter }) as string[][];
  return { headers: head.headers, rows: head.hasHeader ? records.slice(1) : records };
}

/** One record and the line of the file it ends on (the header is line 1). */
export type CsvRow = { line: number; cells: string[] };

/** The file's data rows in slices, with their lines in the file, a turn of the event loop apart. */
async function* rowsOfBytes(bytes: Uint8Array, head: CsvHead): AsyncGenerator<CsvRow[]> {
  const parser = newParser(head.delimiter, head.encoding);
  let skipHeader = head.hasHeader;
  let batch: CsvRow[] = [];
  const push = (cells: string[]) => {
    if (skipHeader) skipHeader = false;
    else batch.push({ line: parser.api.info.lines, cells });
  };
  const start = head.bom ? 3 : 0;
  for (let at = start; at <= bytes.byteLength; at += SLICE) {
    const end = at + SLICE >= bytes.byteLength;
    const slice = Buffer.from(bytes.buffer, bytes.byteOffset + at, Math.min(SLICE, bytes.byteLength - at));
    let err = parser.api.parse(slice, false, push, () => {});
    if (!err && end) err = parser.api.parse(undefined, true, push, () => {});
    // The rows before a break in the file are handed on first.
    if (batch.length > 0) yield batch;
    batch = [];
    if (err) throw err;
    await nextTurn();
    if (end) break;
  }
}

/** Rows already in memory (tests): line = index + 2, as if under a header line. */
async function* rowsOfArray(rows: string[][]): AsyncGenerator<CsvRow[]> {
  const step = 4000;
  for (let i = 0; i < rows.length; i += step) {
    yield rows.slice(i, i + step).map((cells, k) => ({ line: i + k + 2, cells }));
    await nextTurn();
  }
}

export type CsvSource = Uint8Array | string[][];

export async function* rowsOf(source: CsvSource, head?: CsvHead): AsyncGenerator<CsvRow[]> {
  if (Array.isArray(source)) yield* rowsOfArray(source);
  else yield* rowsOfBytes(source, head ?? (await readCsvHead(source)));
}
