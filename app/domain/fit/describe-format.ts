// The small wording helpers behind describe.ts: numbers, temperatures and differences in the
// grower's unit and locale, dates, counts and month runs.
import { cyclicOrder } from "~/domain/fit/facts";
import { deltaToUnit, toUnit, type TempUnit } from "~/domain/units";
import { MONTH_NAMES } from "~/lib/date-words";

export type Format = { unit: TempUnit; locale?: string };
export const DEFAULT_FORMAT: Format = { unit: "C", locale: "en-GB" };

export const numberFormat = (locale: string | undefined, digits: number) =>
  new Intl.NumberFormat(locale ?? "en-GB", { maximumFractionDigits: digits, minimumFractionDigits: 0 });

/** 7.24 → "7.2", 13.0 → "13", −0.04 → "0". */
export function formatNumber(x: number, locale?: string): string {
  const r = Math.round(x * 10) / 10;
  return numberFormat(locale, 1).format(Object.is(r, -0) ? 0 : r);
}

export function temp(c: number, f: Format): string {
  const v = Math.round(toUnit(c, f.unit) * 10) / 10;
  return `${formatNumber(v, f.locale)} °${f.unit}`;
}
export function delta(dc: number, f: Format): string {
  return `${formatNumber(deltaToUnit(dc, f.unit), f.locale)} °${f.unit}`;
}
/** Degree-hours in the grower's unit (K·h or °F·h). */
export const degreeHours = (dh: number, f: Format) =>
  `${numberFormat(f.locale, 0).format(Math.round(deltaToUnit(dh, f.unit)))} degree-hours`;

export const count = (n: number, one: string, many = `${one}s`, f?: Format) =>
  `${numberFormat(f?.locale, 0).format(n)} ${n === 1 ? one : many}`;

/** "17 Jan" from a local date key "2026-01-17", in the locale. */
export function day(key: string, f: Format): string {
  const [y, m, d] = key.split("-").map(Number);
  return new Intl.DateTimeFormat(f.locale ?? "en-GB", { day: "numeric", month: "short", timeZone: "UTC" }).format(
    new Date(Date.UTC(y, m - 1, d)),
  );
}

export function monthRuns(months: number[]): number[][] {
  const runs: number[][] = [];
  for (const m of cyclicOrder(months)) {
    const last = runs.at(-1);
    if (last && m === (last.at(-1)! % 12) + 1) last.push(m);
    else runs.push([m]);
  }
  return runs;
}
export const joinAnd = (parts: string[]) =>
  parts.length <= 1 ? parts.join("") : `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}`;

/** "in July", "in July and August", "from November to February", "in January, March and June". */
export function describeMonths(months: number[]): string {
  const runs = monthRuns(months);
  const name = (m: number) => MONTH_NAMES[m - 1];
  if (runs.length === 0) return "";
  if (runs.length === 1 && runs[0].length === 12) return "all year";
  if (runs.length === 1 && runs[0].length >= 3) return `from ${name(runs[0][0])} to ${name(runs[0].at(-1)!)}`;
  const parts = runs.flatMap((r) => (r.length >= 3 ? [`${name(r[0])}–${name(r.at(-1)!)}`] : r.map(name)));
  return `in ${joinAnd(parts)}`;
}

export const episodes = (list: { date: string; valueC: number; hours: number }[], f: Format) =>
  joinAnd(list.map((e) => `${day(e.date, f)}: ${temp(e.valueC, f)} for ${count(e.hours, "hour", "hours", f)}`));

export const pct = (x: number) => `${Math.round(x)} %`;
export const DLI = "mol m⁻² d⁻¹";

export const rangeWords = (r: [number, number], f: Format) =>
  `${formatNumber(toUnit(r[0], f.unit), f.locale)} to ${temp(r[1], f)}`;
export const pastYears = (years: number) => `from ${years} past ${years === 1 ? "year" : "years"} of weather`;
