// Local calendar arithmetic for a site's IANA time zone. Intl is slow per call, so the zone
// offset is probed at week boundaries and refined to days and hours only around a transition.

export const DAY_MS = 86_400_000;

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let fmt = formatters.get(timeZone);
  if (!fmt) {
    fmt = new Intl.DateTimeFormat("en-US", {
      timeZone,
      hourCycle: "h23",
      year: "numeric",
      month: "numeric",
      day: "numeric",
      hour: "numeric",
      minute: "numeric",
      second: "numeric",
    });
    formatters.set(timeZone, fmt);
  }
  return fmt;
}

function offsetFromIntl(fmt: Intl.DateTimeFormat, ms: number): number {
  const wholeSecond = Math.floor(ms / 1000) * 1000;
  let y = 1970, mo = 1, d = 1, h = 0, mi = 0, s = 0;
  for (const part of fmt.formatToParts(new Date(wholeSecond))) {
    const v = Number(part.value);
    switch (part.type) {
      case "year": y = v; break;
      case "month": mo = v; break;
      case "day": d = v; break;
      case "hour": h = v === 24 ? 0 : v; break;
      case "minute": mi = v; break;
      case "second": s = v; break;
    }
  }
  return Date.UTC(y, mo - 1, d, h, mi, s) - wholeSecond;
}

export type ZoneClock = {
  /** Offset of local time from UTC at this instant, in milliseconds. */
  offsetAt(ms: number): number;
  /** Local days since 1970-01-01 for this instant. */
  localDayNumber(ms: number): number;
};

const WEEK_MS = 7 * DAY_MS;
const HOUR_MS = 3_600_000;
// A span whose two ends share an offset is taken to have none between: no zone changes its
// clock and back again within a week. Shorter spans are probed finer only when the ends differ.
const SPANS = [WEEK_MS, DAY_MS, HOUR_MS] as const;

const clocks = new Map<string, ZoneClock>();

/** One shared clock per zone, so offsets learned for one spot serve every later call. */
export function zoneClock(timeZone: string): ZoneClock {
  const known = clocks.get(timeZone);
  if (known) return known;
  const fmt = formatterFor(timeZone);
  const probes = new Map<number, number>();
  // Per span size: span index → constant offset, or null when the offset changes inside it.
  const spans = SPANS.map(() => new Map<number, number | null>());

  const probe = (ms: number): number => {
    let off = probes.get(ms);
    if (off === undefined) {
      off = offsetFromIntl(fmt, ms);
      probes.set(ms, off);
    }
    return off;
  };

  const offsetAt = (ms: number): number => {
    for (let level = 0; level < SPANS.length; level++) {
      const size = SPANS[level];
      const index = Math.floor(ms / size);
      let off = spans[level].get(index);
      if (off === undefined) {
        const atStart = probe(index * size);
        off = atStart === probe((index + 1) * size) ? atStart : null;
        spans[level].set(index, off);
      }
      if (off !== null) return off;
    }
    return offsetFromIntl(fmt, ms);
  };

  const clock: ZoneClock = {
    offsetAt,
    localDayNumber: (ms) => Math.floor((ms + offsetAt(ms)) / DAY_MS),
  };
  clocks.set(timeZone, clock);
  return clock;
}

export type LocalDate = { year: number; month: number; day: number };

export function dateOfDayNumber(dayNumber: number): LocalDate {
  const d = new Date(dayNumber * DAY_MS);
  return { year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() };
}

export function dayNumberOf(year: number, month: number, day: number): number {
  return Math.floor(Date.UTC(year, month - 1, day) / DAY_MS);
}

export function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

const pad2 = (n: number) => String(n).padStart(2, "0");

export function monthKey(year: number, month: number): string {
  return `${year}-${pad2(month)}`;
}

export function dayKey(date: LocalDate): string {
  return `${date.year}-${pad2(date.month)}-${pad2(date.day)}`;
}
