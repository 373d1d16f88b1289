// Scales and labels for the charts, kept free of the browser so they can be tested plainly.
import { localNaiveMs, zonedToUtc } from "~/lib/time";
import { fromUnit, toUnit, type TempUnit } from "~/domain/units";

const DAY_S = 86_400;

/**
 * Tick labels for a time axis in the site's locale and time zone: hours within a few days ("14:00",
 * with the date at midnight), dates within a few months ("7 Jun"), months over a year ("Jun", the year
 * on January and on the first tick).
 */
export function timeTickLabels(splits: number[], locale: string, timeZone: string): string[] {
  if (splits.length === 0) return [];
  const span = splits.at(-1)! - splits[0];
  const at = (opts: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat(locale, { timeZone, ...opts });
  const hour = at({ hour: "2-digit", minute: "2-digit", hourCycle: "h23" });
  const day = at({ day: "numeric", month: "short" });
  const month = at({ month: "short" });
  const monthYear = at({ month: "short", year: "numeric" });
  const hourOf = (s: number) => Number(at({ hour: "numeric", hourCycle: "h23" }).format(new Date(s * 1000)));
  const monthOf = (s: number) => at({ month: "numeric" }).format(new Date(s * 1000));
  return splits.map((s, i) => {
    const d = new Date(s * 1000);
    if (span <= 4 * DAY_S) return hourOf(s) === 0 ? day.format(d) : hour.format(d);
    if (span <= 100 * DAY_S) return day.format(d);
    return i === 0 || monthOf(s) === "1" ? monthYear.format(d) : month.format(d);
  });
}

/**
 * Ticks on calendar boundaries for a chart of occasional checks (the water page): one per month at
 * local midnight on the 1st, or one per day (every few days) when the range is short, never two
 * labels for one month ("Jan Jan Feb"). Months read "Jan", with the year on the first tick and on
 * January; days read "7 Jun"; both in the site's locale and time zone. `min`/`max` in epoch seconds.
 */
export function calendarTicks(
  min: number,
  max: number,
  locale: string,
  timeZone: string,
  maxTicks = 8,
): { splits: number[]; labels: string[] } {
  if (!(max >= min)) return { splits: [], labels: [] };
  const at = (opts: Intl.DateTimeFormatOptions) => new Intl.DateTimeFormat(locale, { timeZone, ...opts });
  const lo = new Date(localNaiveMs(min * 1000, timeZone));
  const splits: number[] = [];
  const labels: string[] = [];
  if (max - min > 45 * DAY_S) {
    const months = Math.ceil((max - min) / (30.44 * DAY_S));
    const step = [1, 2, 3, 4, 6, 12, 24, 60].find((s) => Math.ceil(months / s) <= maxTicks) ?? 120;
    const month = at({ month: "short" });
    const monthYear = at({ month: "short", year: "numeric" });
    let y = lo.getUTCFullYear();
    let m = lo.getUTCMonth() + 1;
    let lastYear = NaN;
    for (let guard = 0; guard < 1200; guard++) {
      const s = zonedToUtc({ year: y, month: m, day: 1 }, timeZone).getTime() / 1000;
      if (s > max) break;
      if (s >= min && (y * 12 + m - 1) % step === 0) {
        splits.push(s);
        labels.push((y !== lastYear ? monthYear : month).format(new Date(s * 1000)));
        lastYear = y;
      }
      if (++m > 12) [m, y] = [1, y + 1];
    }
    return { splits, labels };
  }
  const days = Math.ceil((max - min) / DAY_S) + 1;
  const step = [1, 2, 3, 7, 14].find((s) => days / s <= maxTicks) ?? 14;
  const day = at({ day: "numeric", month: "short" });
  const first = { year: lo.getUTCFullYear(), month: lo.getUTCMonth() + 1, day: lo.getUTCDate() };
  for (let i = 0; i <= days; i++) {
    // Date.UTC rolls day 32 over into the next month, so walk days on a naive calendar.
    const d = new Date(Date.UTC(first.year, first.month - 1, first.day + i));
    const s =
      zonedToUtc({ year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() }, timeZone).getTime() /
      1000;
    if (s > max) break;
    if (s < min || i % step !== 0) continue;
    splits.push(s);
    labels.push(day.format(new Date(s * 1000)));
  }
  return { splits, labels };
}

/** How much of a thin month was read: whole days when there are any, else hours ("19 h", not "0d"). */
export function coverageLabel(c: { daysObserved: number; hoursObserved?: number }): string {
  if (c.daysObserved > 0) return `${c.daysObserved} d`;
  if (c.hoursObserved && c.hoursObserved > 0) return `${Math.round(c.hoursObserved)} h`;
  return "–";
}

/** Tick values in the grower's unit: every 5 °C, or every 10 °F (round °F, not converted °C steps). */
export function stripTicks(loC: number, hiC: number, unit: TempUnit): { label: number; c: number }[] {
  const step = unit === "F" ? 10 : 5;
  const lo = toUnit(loC, unit);
  const hi = toUnit(hiC, unit);
  const out: { label: number; c: number }[] = [];
  for (let t = Math.ceil(lo / step) * step; t <= hi; t += step) out.push({ label: t, c: fromUnit(t, unit) });
  return out;
}
