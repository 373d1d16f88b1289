// Time zone helpers on Intl only (no tz database of our own).

const offsetFormatters = new Map<string, Intl.DateTimeFormat>();

function partsFormatter(timeZone: string) {
  let f = offsetFormatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone,
      hourCycle: "h23",
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
    });
    offsetFormatters.set(timeZone, f);
  }
  return f;
}

/** Offset of `timeZone` from UTC at `instant`, in minutes (east positive). */
export function zoneOffsetMinutes(instant: Date, timeZone: string): number {
  const p: Record<string, string> = {};
  for (const part of partsFormatter(timeZone).formatToParts(instant)) p[part.type] = part.value;
  const asUtc = Date.UTC(+p.year, +p.month - 1, +p.day, +p.hour, +p.minute, +p.second);
  return Math.round((asUtc - Math.floor(instant.getTime() / 1000) * 1000) / 60000);
}

/**
 * The UTC instant of a wall-clock time in `timeZone`. In the autumn overlap the earlier instant is
 * taken; a time inside the spring gap is moved forward by the gap, as clocks do.
 */
export function zonedToUtc(
  wall: { year: number; month: number; day: number; hour?: number; minute?: number; second?: number },
  timeZone: string,
): Date {
  const naive = Date.UTC(wall.year, wall.month - 1, wall.day, wall.hour ?? 0, wall.minute ?? 0, wall.second ?? 0);
  let guess = naive - zoneOffsetMinutes(new Date(naive), timeZone) * 60000;
  const second = naive - zoneOffsetMinutes(new Date(guess), timeZone) * 60000;
  if (second !== guess) guess = Math.min(guess, second);
  return new Date(guess);
}

const NAIVE = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2}))?$/;

/** Parses "2026-03-01T18:30" (as an <input type="datetime-local"> sends it) in `timeZone`. */
export function parseLocalDateTime(value: string, timeZone: string): Date | null {
  const m = NAIVE.exec(value.trim());
  if (!m) return null;
  const [, y, mo, d, h, mi, s] = m;
  const date = zonedToUtc({ year: +y, month: +mo, day: +d, hour: +h, minute: +mi, second: s ? +s : 0 }, timeZone);
  return Number.isNaN(date.getTime()) ? null : date;
}

export function formatInZone(instant: Date | string, timeZone: string, opts?: Intl.DateTimeFormatOptions) {
  return new Intl.DateTimeFormat("en-GB", {
    timeZone,
    day: "numeric",
    month: "short",
    year: "numeric",
    hour: "2-digit",
    minute: "2-digit",
    ...opts,
  }).format(new Date(instant));
}

export function timeAgo(instant: Date | string | null | undefined, now = Date.now()): string {
  if (!instant) return "never";
  const s = Math.round((now - new Date(instant).getTime()) / 1000);
  if (s < 0) return "just now";
  if (s < 90) return `${s} s ago`;
  if (s < 5400) return `${Math.round(s / 60)} min ago`;
  if (s < 36 * 3600) return `${Math.round(s / 3600)} h ago`;
  return `${Math.round(s / 86400)} days ago`;
}

export function toLocalInputValue(instant: Date, timeZone: string): string {
  const p: Record<string, string> = {};
  for (const part of partsFormatter(timeZone).formatToParts(instant)) p[part.type] = part.value;
  return `${p.year}-${p.month}-${p.day}T${p.hour}:${p.minute}`;
}
