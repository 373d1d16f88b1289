// Scales and labels for the charts, kept free of the browser so they can be tested plainly.
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
