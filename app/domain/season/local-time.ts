// Local calendar arithmetic for a site's IANA time zone. Offsets come from the one time-zone
// module (~/lib/time); this file only does day and month arithmetic on local days.
import { zoneOffsetMs } from "~/lib/time";

export const DAY_MS = 86_400_000;

export type ZoneClock = {
  /** Offset of local time from UTC at this instant, in milliseconds. */
  offsetAt(ms: number): number;
  /** Local days since 1970-01-01 for this instant. */
  localDayNumber(ms: number): number;
};

const clocks = new Map<string, ZoneClock>();

/** One shared clock per zone. */
export function zoneClock(timeZone: string): ZoneClock {
  const known = clocks.get(timeZone);
  if (known) return known;
  const offsetAt = (ms: number) => zoneOffsetMs(ms, timeZone);
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
