// CSV import, the pure part: guessing columns, reading timestamps in the formats loggers write,
// and turning one row into a reading or the reason it can't be one.
import { WallClockReader, zonedToUtc } from "~/lib/time";
import { validateReading, type ParseResult, type SpotKindForLimits } from "~/domain/ingest/payload";

export const CSV_MAX_BYTES = 20 * 1024 * 1024;
export const CSV_MAX_ROWS = 1_000_000;

export const DATE_FORMATS = ["iso", "dmy", "mdy", "epoch"] as const;
export type DateFormat = (typeof DATE_FORMATS)[number];

export type CsvMapping = {
  timestamp: number;
  temperature: number | null;
  humidity: number | null;
  lux: number | null;
  unit: "C" | "F";
  dateFormat: DateFormat;
  timeZone: string;
};

export function guessDelimiter(firstLine: string): string {
  const counts = [",", ";", "\t"].map((d) => [d, firstLine.split(d).length] as const);
  counts.sort((a, b) => b[1] - a[1]);
  return counts[0][1] > 1 ? counts[0][0] : ",";
}

export function guessMapping(
  headers: string[],
): Pick<CsvMapping, "timestamp" | "temperature" | "humidity" | "lux" | "unit"> {
  const find = (re: RegExp) => {
    const i = headers.findIndex((h) => re.test(h));
    return i >= 0 ? i : null;
  };
  const temperature = find(/temp|°c|°f|deg/i);
  return {
    timestamp: find(/time|date|stamp/i) ?? 0,
    temperature,
    humidity: find(/hum|rh|%/i),
    lux: find(/lux|light|illum/i),
    unit: temperature != null && /°?f\b|fahrenheit/i.test(headers[temperature]) ? "F" : "C",
  };
}

const WALL =
  /^(\d{1,4})[-/.](\d{1,2})[-/.](\d{1,4})(?:[T ,]+(\d{1,2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?\s*([ap]\.?m\.?)?)?$/i;
const ZONED = /(Z|[+-]\d{2}:?\d{2})$/i;

/**
 * A timestamp cell as an instant; naive times are read in `zone`: a zone name, or a reader that
 * reads a file's rows in order (a repeated hour is read as the logger wrote it, see
 * WallClockReader). Null when unreadable.
 */
export function parseCsvTime(cell: string, format: DateFormat, zone: string | WallClockReader): Date | null {
  const v = cell.trim().replace(/^"|"$/g, "");
  if (!v) return null;
  if (format === "epoch" || /^\d{9,13}(\.\d+)?$/.test(v)) {
    const n = Number(v);
    if (!Number.isFinite(n)) return null;
    const d = new Date(n > 1e11 ? n : n * 1000);
    return Number.isNaN(d.getTime()) ? null : d;
  }
  if (format === "iso" && ZONED.test(v)) {
    const d = new Date(v.replace(" ", "T"));
    return Number.isNaN(d.getTime()) ? null : d;
  }
  const m = WALL.exec(v);
  if (!m) return null;
  let [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (format === "dmy") [d, mo, y] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (format === "mdy") [mo, d, y] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (y < 100) y += 2000;
  let hour = m[4] ? Number(m[4]) : 0;
  const minute = m[5] ? Number(m[5]) : 0;
  const second = m[6] ? Number(m[6]) : 0;
  const ampm = m[7]?.toLowerCase().replace(/\./g, "");
  if (ampm) {
    if (hour < 1 || hour > 12) return null;
    if (ampm === "pm" && hour < 12) hour += 12;
    if (ampm === "am" && hour === 12) hour = 0;
  }
  if (mo < 1 || mo > 12 || d < 1 || d > 31 || hour > 23 || minute > 59 || second > 59) return null;
  const probe = new Date(Date.UTC(y, mo - 1, d));
  if (probe.getUTCDate() !== d) return null; // 31 April and the like
  const wall = { year: y, month: mo, day: d, hour, minute, second };
  return typeof zone === "string" ? zonedToUtc(wall, zone) : new Date(zone.read(wall));
}

const cellNumber = (cell: string | undefined): number | string | null => {
  if (cell == null) return null;
  const v = cell.trim().replace(",", ".");
  if (v === "" || v === "-" || /^n\/?a$/i.test(v)) return null;
  return /^-?\d+(\.\d+)?$/.test(v) ? Number(v) : v;
};

export function rowToReading(
  row: string[],
  mapping: CsvMapping,
  sensorId: number,
  opts: { now: Date; kind: SpotKindForLimits; clock?: WallClockReader },
): ParseResult {
  const cell = row[mapping.timestamp];
  if (cell == null) return { ok: false, reason: "row has no timestamp column" };
  const at = parseCsvTime(cell, mapping.dateFormat, opts.clock ?? mapping.timeZone);
  if (!at) return { ok: false, reason: `timestamp “${cell.slice(0, 40)}” is not in the chosen format` };
  const pick = (i: number | null) => (i == null ? null : cellNumber(row[i]));
  return validateReading(
    sensorId,
    {
      time: at.getTime(),
      temperature: pick(mapping.temperature) as never,
      humidity: pick(mapping.humidity) as never,
      lux: pick(mapping.lux) as never,
      unit: mapping.unit,
    },
    opts,
  );
}
