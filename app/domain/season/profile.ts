// The season profile of a spot: its days (days.ts) gathered into calendar months, the seasons of
// the site's hemisphere and the months of the year across years, each with its statistics
// (period-stats.ts) and whether it has enough data (thresholds.ts).
import {
  DAY_MS,
  dateOfDayNumber,
  dayKey,
  dayNumberOf,
  daysInMonth,
  monthKey,
  zoneClock,
} from "~/domain/season/local-time";
import { luxPerPpfdFor } from "~/domain/climate/light";
import type { LightSource } from "~/domain/vocabulary";
import { resolveWall } from "~/lib/time";
import { MONTH_NAMES } from "~/lib/date-words";
import type {
  DaySummary,
  Hemisphere,
  HourlyRollup,
  MonthOfYearProfile,
  MonthProfile,
  NightSummary,
  SeasonName,
  SeasonPeriodProfile,
  SeasonProfile,
  Site,
} from "~/domain/season/types";
import {
  addHour,
  dayDli,
  dayNightDifference,
  finiteOrNull,
  HOUR_MS,
  newDay,
  sunWindow,
  type DayAgg,
  type Night,
} from "~/domain/season/days";
import {
  aggregate,
  clippingIn,
  findLuxCeiling,
  mergeSorted,
  sortedHourlyMeans,
  withCoverage,
  type Stats,
} from "~/domain/season/period-stats";
import {
  DEFAULT_THRESHOLDS_C,
  MIN_DAYS_FOR_MONTH,
  MIN_HOURS_FOR_DAY,
  NIGHT_END_HOUR,
  NIGHT_START_HOUR,
} from "~/domain/season/thresholds";

export { MONTH_NAMES };

/** `lightSource` picks the lux → PPFD factor of the DLI (default sunlight) and whether clipping is looked for. */
export type SeasonProfileOptions = { from: Date; to: Date; thresholds?: number[]; lightSource?: LightSource };

export function hemisphereOf(latitude: number): Hemisphere {
  return latitude < 0 ? "southern" : "northern";
}

const SEASON_BY_START: Record<Hemisphere, Record<number, SeasonName>> = {
  northern: { 12: "winter", 3: "spring", 6: "summer", 9: "autumn" },
  southern: { 12: "summer", 3: "autumn", 6: "winter", 9: "spring" },
};

/** Meteorological seasons: Dec–Feb, Mar–May, Jun–Aug, Sep–Nov; names flip in the south. */
function seasonStart(year: number, month: number): { year: number; month: number } {
  if (month === 12) return { year, month: 12 };
  if (month <= 2) return { year: year - 1, month: 12 };
  return { year, month: month - (month % 3) };
}

function addMonths(year: number, month: number, n: number): { year: number; month: number } {
  const i = year * 12 + (month - 1) + n;
  return { year: Math.floor(i / 12), month: (i % 12) + 1 };
}

/**
 * Season profile of one spot over [from, to): per local calendar month, per season of the
 * site's hemisphere, per month of the year across years, and per local day.
 */
export function seasonProfile(rollups: HourlyRollup[], site: Site, opts: SeasonProfileOptions): SeasonProfile {
  const thresholds = [...new Set([...DEFAULT_THRESHOLDS_C, ...(opts.thresholds ?? [])])].sort((a, b) => a - b);
  const luxPerPpfd = luxPerPpfdFor(opts.lightSource);
  const hemisphere = hemisphereOf(site.latitude);
  const clock = zoneClock(site.timeZone);
  const fromMs = opts.from.getTime();
  const toMs = opts.to.getTime();

  const days = new Map<number, DayAgg>();
  const nights = new Map<number, Night>();
  for (const r of rollups) {
    const ms = r.hour.getTime();
    if (ms < fromMs || ms >= toMs) continue;
    const local = ms + clock.offsetAt(ms);
    const dayNumber = Math.floor(local / DAY_MS);
    let day = days.get(dayNumber);
    if (!day) {
      const localNoonMs = resolveWall(dayNumber * DAY_MS + 12 * HOUR_MS, site.timeZone).ms;
      day = newDay(dayNumber, thresholds.length, sunWindow(localNoonMs, dayNumber, site));
      days.set(dayNumber, day);
    }
    addHour(day, r, ms, thresholds, luxPerPpfd);
    const hourOfDay = Math.floor((local - dayNumber * DAY_MS) / HOUR_MS);
    if (r.tN > 0 && r.tSum !== null && (hourOfDay >= NIGHT_START_HOUR || hourOfDay < NIGHT_END_HOUR)) {
      const start = hourOfDay >= NIGHT_START_HOUR ? dayNumber : dayNumber - 1;
      const low = r.tMin ?? r.tSum / r.tN;
      const night = nights.get(start);
      if (night) {
        night.low = Math.min(night.low, low);
        night.hours++;
        night.temps.push(r.tSum / r.tN);
      } else nights.set(start, { dayNumber: start, low, hours: 1, morningDay: dayNumber, temps: [r.tSum / r.tN] });
    }
  }
  // A night is counted with the day it starts on; one whose evening has no readings (a file that
  // starts at midnight) with its morning's day, so it is neither lost nor counted twice.
  // A night that started before the requested range is left to the range before it.
  const firstLocalDay = clock.localDayNumber(fromMs);
  for (const n of nights.values()) {
    if (n.dayNumber < firstLocalDay) nights.delete(n.dayNumber);
    else (days.get(n.dayNumber) ?? days.get(n.morningDay))!.nights.push(n);
  }

  const orderedDays = [...days.values()].sort((a, b) => a.dayNumber - b.dayNumber);
  const lampsOnly = opts.lightSource === "led" || opts.lightSource === "fluorescent";
  const ceiling = lampsOnly ? null : findLuxCeiling(orderedDays);
  const daysByMonth = new Map<string, DayAgg[]>();
  for (const d of orderedDays) {
    const key = monthKey(d.date.year, d.date.month);
    const list = daysByMonth.get(key);
    if (list) list.push(d);
    else daysByMonth.set(key, [d]);
  }

  const months: MonthProfile[] = [];
  const monthDays = new Map<string, DayAgg[]>();
  // Each month's hourly means are sorted once; seasons and months of the year merge them, and a
  // month of the year seen in one calendar month only (the usual year) reuses that month's figures.
  const monthHourly = new Map<string, Float64Array>();
  const monthStats = new Map<string, Stats>();
  if (toMs > fromMs) {
    const firstDay = clock.localDayNumber(fromMs);
    const lastDay = clock.localDayNumber(toMs - 1);
    const first = dateOfDayNumber(firstDay);
    const last = dateOfDayNumber(lastDay);
    for (
      let ym = { year: first.year, month: first.month };
      ym.year * 12 + ym.month <= last.year * 12 + last.month;
      ym = addMonths(ym.year, ym.month, 1)
    ) {
      const key = monthKey(ym.year, ym.month);
      const dim = daysInMonth(ym.year, ym.month);
      const start = dayNumberOf(ym.year, ym.month, 1);
      const inRange = Math.min(start + dim - 1, lastDay) - Math.max(start, firstDay) + 1;
      const list = daysByMonth.get(key) ?? [];
      monthDays.set(key, list);
      const hourly = sortedHourlyMeans(list);
      monthHourly.set(key, hourly);
      const stats = aggregate(list, thresholds, ceiling, hourly);
      monthStats.set(key, stats);
      months.push({
        key,
        year: ym.year,
        month: ym.month,
        ...withCoverage(stats, dim, inRange, stats.daysObserved >= MIN_DAYS_FOR_MONTH),
      });
    }
  }

  const seasonGroups = new Map<string, { start: { year: number; month: number }; months: MonthProfile[] }>();
  for (const m of months) {
    const start = seasonStart(m.year, m.month);
    const key = monthKey(start.year, start.month);
    const group = seasonGroups.get(key);
    if (group) group.months.push(m);
    else seasonGroups.set(key, { start, months: [m] });
  }
  const seasons: SeasonPeriodProfile[] = [...seasonGroups.values()].map(({ start, months: ms }) => {
    const end = addMonths(start.year, start.month, 2);
    const season = SEASON_BY_START[hemisphere][start.month];
    const label =
      start.month === 12
        ? `${season} ${start.year}–${String((start.year + 1) % 100).padStart(2, "0")}`
        : `${season} ${start.year}`;
    const daysInPeriod = [0, 1, 2].reduce((n, i) => {
      const ym = addMonths(start.year, start.month, i);
      return n + daysInMonth(ym.year, ym.month);
    }, 0);
    const stats = aggregate(
      ms.flatMap((m) => monthDays.get(m.key)!),
      thresholds,
      ceiling,
      mergeSorted(ms.map((m) => monthHourly.get(m.key)!)),
    );
    const enough = ms.length === 3 && ms.every((m) => m.coverage.enough);
    return {
      key: `${monthKey(start.year, start.month)}/${monthKey(end.year, end.month)}`,
      season,
      label,
      months: ms.map((m) => m.key),
      ...withCoverage(
        stats,
        daysInPeriod,
        ms.reduce((n, m) => n + m.coverage.daysInRange, 0),
        enough,
      ),
    };
  });

  const year: MonthOfYearProfile[] = MONTH_NAMES.map((name, i) => {
    const month = i + 1;
    const included = months.filter((m) => m.month === month);
    const stats =
      included.length === 1
        ? monthStats.get(included[0].key)!
        : aggregate(
            included.flatMap((m) => monthDays.get(m.key)!),
            thresholds,
            ceiling,
            mergeSorted(included.map((m) => monthHourly.get(m.key)!)),
          );
    return {
      key: String(month).padStart(2, "0"),
      month,
      name,
      monthsIncluded: included.map((m) => m.key),
      ...withCoverage(
        stats,
        included.reduce((n, m) => n + m.coverage.daysInPeriod, 0),
        included.reduce((n, m) => n + m.coverage.daysInRange, 0),
        stats.daysObserved >= MIN_DAYS_FOR_MONTH,
      ),
    };
  });

  const daySummaries: DaySummary[] = orderedDays.map((d) => ({
    key: dayKey(d.date),
    monthKey: monthKey(d.date.year, d.date.month),
    month: d.date.month,
    dayNumber: d.dayNumber,
    hoursObserved: d.hours,
    complete: d.hours >= MIN_HOURS_FOR_DAY,
    low: finiteOrNull(d.low),
    high: finiteOrNull(d.high),
    dayHours: d.dayN,
    nightHours: d.nightN,
    dayNightDifference: dayNightDifference(d),
    lightHours: d.lightHours,
    dli: dayDli(d),
    temps: d.tempMeans,
    rhLow: finiteOrNull(d.rhLow),
  }));

  const nightSummaries: NightSummary[] = [...nights.values()]
    .sort((a, b) => a.dayNumber - b.dayNumber)
    .map((n) => {
      const date = dateOfDayNumber(n.dayNumber);
      return {
        key: dayKey(date),
        month: date.month,
        dayNumber: n.dayNumber,
        hoursObserved: n.hours,
        low: n.low,
        temps: n.temps,
      };
    });

  return {
    timeZone: site.timeZone,
    hemisphere,
    from: opts.from,
    to: opts.to,
    thresholds,
    luxPerPpfd,
    luxClipped: clippingIn(orderedDays, ceiling),
    months,
    seasons,
    year,
    days: daySummaries,
    nights: nightSummaries,
  };
}
