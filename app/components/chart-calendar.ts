// Calendar ticks for the water chart: local midnights in the site's zone, which takes the zone
// rules of lib/time (Temporal). Apart from chart-scale.ts so that the pages importing only its
// scales and labels (the year strip, the spot cards) do not ship the polyfill; the chart that uses
// this is loaded after the page's answer.
import { localNaiveMs, zonedToUtc } from "~/lib/time";

const DAY_S = 86_400;

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
