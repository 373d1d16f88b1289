// Display units. Values are stored in °C; the user's preference only changes what is shown.
import { cToF, fToC } from "~/domain/climate/psychro";

import type { TempUnit } from "~/domain/vocabulary";
export type { TempUnit };

export const toUnit = (c: number, unit: TempUnit) => (unit === "F" ? cToF(c) : c);
export const fromUnit = (v: number, unit: TempUnit) => (unit === "F" ? fToC(v) : v);
export const deltaFromUnit = (d: number, unit: TempUnit) => (unit === "F" ? (d * 5) / 9 : d);
export const deltaToUnit = (dc: number, unit: TempUnit) => (unit === "F" ? (dc * 9) / 5 : dc);

export function formatTemp(c: number | null | undefined, unit: TempUnit, digits = 1) {
  if (c == null || Number.isNaN(c)) return "–";
  return `${toUnit(c, unit).toFixed(digits)} °${unit}`;
}

export function formatDelta(dc: number | null | undefined, unit: TempUnit, digits = 1) {
  if (dc == null || Number.isNaN(dc)) return "–";
  return `${deltaToUnit(dc, unit).toFixed(digits)} °${unit}`;
}
