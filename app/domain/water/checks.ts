// One logged water check in the units the grower's meter gives, turned into the figure the rules
// of thumb use (ppm) with a label saying where it came from.
import { ecToPpm, type TdsScale } from "~/domain/water/water";

export const STANDARD_SOURCES = ["tap", "rain", "filtered"] as const;

export type StoredCheck = { ppm: number | null; ec: number | null; ecScale: number | null; ph: number | null };

const isScale = (s: number | null): s is TdsScale => s === 0.5 || s === 0.7;

/** TDS in ppm: as measured, or converted from EC on the meter's scale; null when neither was taken. */
export function checkPpm(c: StoredCheck): number | null {
  if (c.ppm != null) return c.ppm;
  if (c.ec != null && isScale(c.ecScale)) return ecToPpm(c.ec, c.ecScale);
  return null;
}

const round = (v: number, d = 0) => Number(v.toFixed(d)).toLocaleString("en");

/** "280 ppm (TDS meter)" or "560 µS/cm × 0.5 (NaCl scale) ≈ 280 ppm". */
export function ppmLabel(c: StoredCheck): string {
  if (c.ppm != null) return `${round(c.ppm)} ppm (TDS)`;
  if (c.ec != null && isScale(c.ecScale)) {
    const scale = c.ecScale === 0.5 ? "NaCl scale" : "442 scale";
    return `${round(c.ec)} µS/cm × ${c.ecScale} (${scale}) ≈ ${round(ecToPpm(c.ec, c.ecScale))} ppm`;
  }
  return "not measured";
}

/** A source's display name: the standard ones capitalised, a grower's own name as typed. */
export function sourceName(source: string): string {
  return (STANDARD_SOURCES as readonly string[]).includes(source) ? `${source[0].toUpperCase()}${source.slice(1)} water` : source;
}

/** Normalises what the form sent: a standard key, or a trimmed own name of 1–40 characters. */
export function parseSource(choice: string, own: string): string | null {
  if ((STANDARD_SOURCES as readonly string[]).includes(choice)) return choice;
  const name = own.trim().replace(/\s+/g, " ");
  if (name.length < 1 || name.length > 40) return null;
  const lower = name.toLowerCase();
  return (STANDARD_SOURCES as readonly string[]).includes(lower) ? lower : name;
}
