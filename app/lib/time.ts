// The one time-zone module. Instants are UTC; everything local (wall-clock times, local hours,
// days, nights) goes through here. Zone rules come from Temporal (the temporal-polyfill package,
// docs/decisions/0001-time-zones.md); because the polyfill takes microseconds per conversion and a
// CSV import converts a million rows, offsets are remembered per hour, and the library is asked
// again only in an hour where the offset changes.
import { Temporal } from "temporal-polyfill";
import { MONTH_NAMES } from "~/lib/date-words";

const HOUR_MS = 3_600_000;
const CACHE_LIMIT = 200_000; // hours per zone (about 22 years); cleared rather than grown without bound

export type WallTime = { year: number; month: number; day: number; hour?: number; minute?: number; second?: number };

/** How a wall-clock time was read: a plain time, one in the spring gap, or one in the repeated hour. */
export type WallKind = "plain" | "skipped" | "repeated";

export type ResolvedWall = {
  /** The instant, epoch milliseconds. */
  ms: number;
  kind: WallKind;
  /** Both readings of a repeated time, or the times before and after a skipped one moved by the gap. */
  earlier: number;
  later: number;
};

/** A wall-clock time as if it were UTC: milliseconds that compare and subtract like local times. */
export function naiveMs(wall: WallTime): number {
  return Date.UTC(wall.year, wall.month - 1, wall.day, wall.hour ?? 0, wall.minute ?? 0, wall.second ?? 0);
}

function plainDateTime(naive: number): Temporal.PlainDateTime {
  const d = new Date(naive);
  return new Temporal.PlainDateTime(
    d.getUTCFullYear(),
    d.getUTCMonth() + 1,
    d.getUTCDate(),
    d.getUTCHours(),
    d.getUTCMinutes(),
    d.getUTCSeconds(),
    d.getUTCMilliseconds(),
  );
}

class Zone {
  // UTC hour → offset in ms when constant through the hour, NaN when it changes inside it.
  private readonly byInstantHour = new Map<number, number>();
  // Local hour (naive ms / HOUR) → offset in ms when every wall time of the hour exists once.
  private readonly byLocalHour = new Map<number, number>();

  constructor(readonly id: string) {}

  private exactOffset(ms: number): number {
    return Temporal.Instant.fromEpochMilliseconds(ms).toZonedDateTimeISO(this.id).offsetNanoseconds / 1e6;
  }

  offsetAt(ms: number): number {
    const hour = Math.floor(ms / HOUR_MS);
    let off = this.byInstantHour.get(hour);
    if (off === undefined) {
      const start = this.exactOffset(hour * HOUR_MS);
      off = start === this.exactOffset(hour * HOUR_MS + HOUR_MS - 1) ? start : NaN;
      if (this.byInstantHour.size >= CACHE_LIMIT) this.byInstantHour.clear();
      this.byInstantHour.set(hour, off);
    }
    return Number.isNaN(off) ? this.exactOffset(ms) : off;
  }

  /** The offset of a local hour in which nothing happens to the clock, or NaN. */
  private localHourOffset(hour: number): number {
    let off = this.byLocalHour.get(hour);
    if (off === undefined) {
      const start = plainDateTime(hour * HOUR_MS);
      const earlier = start.toZonedDateTime(this.id, { disambiguation: "earlier" });
      const later = start.toZonedDateTime(this.id, { disambiguation: "later" });
      off = NaN;
      if (earlier.epochMilliseconds === later.epochMilliseconds) {
        const o = earlier.offsetNanoseconds / 1e6;
        const s = earlier.epochMilliseconds;
        // The hour's instants keep that offset to its end and just past it (a step back right at
        // the end would make the end of this hour happen twice).
        if (hour * HOUR_MS - o === s && this.offsetAt(s + HOUR_MS - 1) === o && this.offsetAt(s + HOUR_MS) === o)
          off = o;
      }
      if (this.byLocalHour.size >= CACHE_LIMIT) this.byLocalHour.clear();
      this.byLocalHour.set(hour, off);
    }
    return off;
  }

  /**
   * A wall-clock time (as naive ms) as an instant. `prefer` picks between the two instants of a
   * repeated time; a skipped time is always moved forward by the gap (Temporal's "compatible").
   */
  resolve(naive: number, prefer: "earlier" | "later" = "earlier"): ResolvedWall {
    const off = this.localHourOffset(Math.floor(naive / HOUR_MS));
    if (!Number.isNaN(off)) {
      const ms = naive - off;
      return { ms, kind: "plain", earlier: ms, later: ms };
    }
    const pdt = plainDateTime(naive);
    const earlier = pdt.toZonedDateTime(this.id, { disambiguation: "earlier" });
    const later = pdt.toZonedDateTime(this.id, { disambiguation: "later" });
    const e = earlier.epochMilliseconds;
    const l = later.epochMilliseconds;
    if (e === l) return { ms: e, kind: "plain", earlier: e, later: l };
    // In a repeated hour both instants show the same wall time; in a gap neither does.
    const repeated = e + earlier.offsetNanoseconds / 1e6 === naive;
    if (repeated) return { ms: prefer === "earlier" ? e : l, kind: "repeated", earlier: e, later: l };
    return { ms: l, kind: "skipped", earlier: e, later: l };
  }
}

const zones = new Map<string, Zone>();

function zone(timeZone: string): Zone {
  let z = zones.get(timeZone);
  if (!z) {
    z = new Zone(timeZone);
    zones.set(timeZone, z);
  }
  return z;
}

/** Offset of `timeZone` from UTC at the instant `ms`, in milliseconds (east positive). */
export function zoneOffsetMs(ms: number, timeZone: string): number {
  return zone(timeZone).offsetAt(ms);
}

/** Offset of `timeZone` from UTC at `instant`, in minutes (east positive). */
export function zoneOffsetMinutes(instant: Date, timeZone: string): number {
  return Math.round(zoneOffsetMs(instant.getTime(), timeZone) / 60000);
}

/** A wall-clock time (naive ms) in `timeZone`, with how it was read; see `Zone.resolve`. */
export function resolveWall(naive: number, timeZone: string, prefer: "earlier" | "later" = "earlier"): ResolvedWall {
  return zone(timeZone).resolve(naive, prefer);
}

/**
 * The UTC instant of a wall-clock time in `timeZone`. A time that happens twice (the autumn
 * overlap) is taken at its first occurrence; a time inside the spring gap is moved forward by the
 * gap, as clocks do ("2025-03-30 02:30" in Madrid is 03:30 CEST). Both as Temporal's "compatible".
 */
export function zonedToUtc(wall: WallTime, timeZone: string): Date {
  return new Date(resolveWall(naiveMs(wall), timeZone).ms);
}

/** The wall-clock time at `ms` in `timeZone` as naive ms (read it with getUTC*). */
export function localNaiveMs(ms: number, timeZone: string): number {
  return ms + zoneOffsetMs(ms, timeZone);
}

/**
 * Reads a file's wall-clock times in file order, as a logger writes them: in a repeated hour the
 * times are read at the earlier offset until the clock steps back, and at the later one after
 * that. Counts what it did, for the import preview to say.
 */
export class WallClockReader {
  private prevNaive: number | null = null;
  private prevRepeatedDay: number | null = null;
  private readonly secondPass = new Set<number>();
  /** Per local date of a change ("2025-10-26"): rows read in the gap, or in the repeated hour. */
  readonly changes = new Map<string, DstChange>();

  constructor(readonly timeZone: string) {}

  read(wall: WallTime): number {
    const naive = naiveMs(wall);
    const z = zone(this.timeZone);
    let r = z.resolve(naive, "earlier");
    if (r.kind === "repeated") {
      const day = Math.floor(naive / 86_400_000);
      // The clock stepped back: an earlier (or equal) wall time right after one in the same repeat.
      if (
        !this.secondPass.has(day) &&
        this.prevRepeatedDay === day &&
        this.prevNaive !== null &&
        naive <= this.prevNaive
      )
        this.secondPass.add(day);
      if (this.secondPass.has(day)) r = { ...r, ms: r.later };
      this.note(naive, r, this.secondPass.has(day) ? "second" : "first");
      this.prevRepeatedDay = day;
    } else {
      if (r.kind === "skipped") this.note(naive, r, "skipped");
      this.prevRepeatedDay = null;
    }
    this.prevNaive = naive;
    return r.ms;
  }

  private note(naive: number, r: ResolvedWall, as: "first" | "second" | "skipped") {
    const key = new Date(naive).toISOString().slice(0, 10);
    let c = this.changes.get(key);
    if (!c) {
      const before = zoneOffsetMs(r.earlier, this.timeZone);
      const after = zoneOffsetMs(r.later, this.timeZone);
      c = {
        date: key,
        kind: as === "skipped" ? "skipped" : "repeated",
        rows: 0,
        first: 0,
        second: 0,
        offsetBeforeMin: before / 60000,
        offsetAfterMin: after / 60000,
        example: null,
      };
      this.changes.set(key, c);
    }
    c.rows++;
    if (as === "first") c.first++;
    if (as === "second") c.second++;
    if (as === "skipped" && c.example === null)
      c.example = { wall: formatNaive(naive), readAs: formatNaive(r.ms + zoneOffsetMs(r.ms, this.timeZone)) };
  }
}

export type DstChange = {
  date: string; // local date of the change, YYYY-MM-DD
  kind: "skipped" | "repeated";
  rows: number;
  /** Repeated hour: rows read at the earlier offset, and after the clock stepped back. */
  first: number;
  second: number;
  offsetBeforeMin: number;
  offsetAfterMin: number;
  /** Skipped hour: one row's wall time and the wall time it was read as. */
  example: { wall: string; readAs: string } | null;
};

function formatNaive(naive: number): string {
  return new Date(naive).toISOString().slice(11, 16);
}

/** "UTC+02:00", "UTC−03:30" */
export function formatOffset(minutes: number): string {
  const sign = minutes < 0 ? "−" : "+";
  const m = Math.abs(minutes);
  return `UTC${sign}${String(Math.floor(m / 60)).padStart(2, "0")}:${String(m % 60).padStart(2, "0")}`;
}

/** One sentence on how the rows at a clock change were read, for the import preview. */
export function describeDstChange(c: DstChange): string {
  const [y, mo, d] = c.date.split("-").map(Number);
  const when = `${d} ${MONTH_NAMES[mo - 1]} ${y}`;
  const rows = (n: number) => `${n.toLocaleString("en")} ${n === 1 ? "row" : "rows"}`;
  if (c.kind === "skipped") {
    const gap = c.offsetAfterMin - c.offsetBeforeMin;
    const by = gap % 60 === 0 ? `${gap / 60} h` : `${gap} min`;
    const example = c.example ? ` (${c.example.wall} as ${c.example.readAs})` : "";
    return (
      `${rows(c.rows)} in the skipped hour of ${when} (clocks went ` +
      `forward, so those times never happened) were read as ${by} ` +
      `later, ${formatOffset(c.offsetAfterMin)}${example}.`
    );
  }
  const second =
    c.second > 0
      ? `, then ${rows(c.second)} after the clock went back as the second, ${formatOffset(c.offsetAfterMin)}`
      : "";
  return (
    `${rows(c.rows)} in the repeated hour of ${when} were read in ` +
    `file order: ${rows(c.first)} as the first occurrence, ` +
    `${formatOffset(c.offsetBeforeMin)}${second}.`
  );
}

const NAIVE = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/** Parses "2026-03-01T18:30" (as an <input type="datetime-local"> sends it) in `timeZone`. */
export function parseLocalDateTime(value: string, timeZone: string): Date | null {
  const m = NAIVE.exec(value.trim());
  if (!m) return null;
  const [, y, mo, d, h, mi, s] = m;
  const wall = { year: +y, month: +mo, day: +d, hour: +h, minute: +mi, second: s ? +s : 0 };
  const probe = new Date(naiveMs(wall));
  if (
    Number.isNaN(probe.getTime()) ||
    probe.getUTCDate() !== wall.day ||
    wall.hour > 23 ||
    wall.minute > 59 ||
    wall.second > 59
  )
    return null;
  return zonedToUtc(wall, timeZone);
}

export function toLocalInputValue(instant: Date, timeZone: string): string {
  return new Date(localNaiveMs(Math.floor(instant.getTime() / 60000) * 60000, timeZone)).toISOString().slice(0, 16);
}
