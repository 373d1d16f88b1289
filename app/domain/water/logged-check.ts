// One logged water check in the units the grower's meter gives, turned into the figure the rules
// of thumb use (conductivity, µS/cm) with a label saying where it came from.
import {
  ecToPpm,
  ppmToEc,
  sampleEc,
  type TdsScale,
  type WaterAssessment,
  type WaterSample,
} from "~/domain/water/verdict";

export const STANDARD_SOURCES = ["tap", "rain", "filtered"] as const;

/**
 * As stored: a TDS meter's ppm or an EC meter's µS/cm, and the meter's scale (ppm per µS/cm) when
 * the grower gave it. For a TDS meter the scale turns its ppm back into conductivity; for an EC
 * meter it only says which ppm the grower's other tables mean.
 */
export type StoredCheck = { ppm: number | null; ec: number | null; ecScale: number | null; ph: number | null };

/** A check as the water page lists it: as stored, with who logged it, its exact conductivity and its verdict. */
export type LoggedCheck = StoredCheck &
  Pick<WaterAssessment, "verdict" | "reasons" | "buffered"> & {
    id: number;
    source: string;
    checkedOn: Date;
    byName: string | null;
    ecExact: number | null;
  };

export const isScale = (s: number | null | undefined): s is TdsScale => s === 0.5 || s === 0.7;

/** The sample the verdict reads: an EC reading as conductivity, a TDS reading with its scale if known. */
export function checkSample(c: StoredCheck): WaterSample {
  return c.ec != null
    ? { ec: c.ec, ppm: null, ph: c.ph }
    : { ppm: c.ppm, scale: isScale(c.ecScale) ? c.ecScale : null, ph: c.ph };
}

/** Conductivity in µS/cm when it is known exactly (an EC reading, or ppm on a known scale), else null. */
export function checkEc(c: StoredCheck): number | null {
  const range = sampleEc(checkSample(c));
  return range && range.low === range.high ? range.low : null;
}

/** TDS in ppm: as measured, or converted from EC on the meter's scale; null when neither is known. */
export function checkPpm(c: StoredCheck): number | null {
  if (c.ppm != null) return c.ppm;
  if (c.ec != null && isScale(c.ecScale)) return ecToPpm(c.ec, c.ecScale);
  return null;
}

const round = (v: number, d = 0) => Number(v.toFixed(d)).toLocaleString("en");

/**
 * "280 ppm (TDS, 0.5 scale) = 560 µS/cm", "280 ppm (TDS, scale not given) = 400–560 µS/cm" or
 * "560 µS/cm (EC) = 280 ppm on a 0.5 meter, 392 on a 0.7".
 */
export function ppmLabel(c: StoredCheck): string {
  if (c.ec != null)
    return `${round(c.ec)} µS/cm (EC) = ${round(ecToPpm(c.ec, 0.5))} ppm on a 0.5 meter, ${round(ecToPpm(c.ec, 0.7))} on a 0.7`;
  if (c.ppm != null) {
    if (isScale(c.ecScale))
      return `${round(c.ppm)} ppm (TDS, ${c.ecScale} scale) = ${round(ppmToEc(c.ppm, c.ecScale))} µS/cm`;
    return `${round(c.ppm)} ppm (TDS, scale not given) = ${round(ppmToEc(c.ppm, 0.7))}–${round(ppmToEc(c.ppm, 0.5))} µS/cm`;
  }
  return "not measured";
}

/** A source's display name: the standard ones capitalised, a grower's own name as typed. */
export function sourceName(source: string): string {
  return (STANDARD_SOURCES as readonly string[]).includes(source)
    ? `${source[0].toUpperCase()}${source.slice(1)} water`
    : source;
}

/** Normalises what the form sent: a standard key, or a trimmed own name of 1–40 characters. */
export function parseSource(choice: string, own: string): string | null {
  if ((STANDARD_SOURCES as readonly string[]).includes(choice)) return choice;
  const name = own.trim().replace(/\s+/g, " ");
  if (name.length < 1 || name.length > 40) return null;
  const lower = name.toLowerCase();
  return (STANDARD_SOURCES as readonly string[]).includes(lower) ? lower : name;
}
