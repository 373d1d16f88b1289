// Checking a water source before it goes on orchids. The thresholds are growers' rules of thumb
// (common practice), not published standards.

/**
 * ppm per µS/cm on a TDS meter's scale: 0.5 for the NaCl scale, 0.7 for the "442" scale (a mix of
 * sodium sulfate, sodium bicarbonate and sodium chloride). Common practice; the meter's manual says
 * which one it uses.
 */
export type TdsScale = 0.5 | 0.7;

export const TDS_SCALE_NACL: TdsScale = 0.5;
export const TDS_SCALE_442: TdsScale = 0.7;

/** Above this, water is not for routine watering of orchids (common practice). */
export const ROUTINE_WATERING_MAX_PPM = 100;
/** Irrigation water pH range growers aim for (common practice). */
export const PH_MIN = 5.5;
export const PH_MAX = 6.5;

/** Total dissolved solids, ppm, from electrical conductivity in µS/cm on the given meter scale. */
export function ecToPpm(ecMicroSiemensPerCm: number, scale: TdsScale): number {
  return ecMicroSiemensPerCm * scale;
}

/**
 * "good": fine for routine watering. "adjust": usable once the pH is brought into range, or a
 * value is missing so it cannot be called good yet. "avoid": too much dissolved mineral for
 * routine watering — salts build up in the pot.
 */
export type WaterVerdict = "good" | "adjust" | "avoid";

export interface WaterSample {
  /** Total dissolved solids, ppm; null when not measured. */
  ppm: number | null;
  /** null when not measured. */
  ph: number | null;
}

export interface WaterAssessment {
  verdict: WaterVerdict;
  reasons: string[];
}

function formatNumber(value: number, digits: number): string {
  return Number(value.toFixed(digits)).toString();
}

/**
 * Verdict and plain-word reasons for one water check. A value exactly on a threshold is within
 * it: the rule is "over 100 ppm", and 5.5 and 6.5 are inside the pH range.
 * Throws RangeError for values no meter can read (negative ppm, pH outside 0–14), which means a
 * typing slip rather than a water problem.
 */
export function waterVerdict(sample: WaterSample): WaterAssessment {
  const { ppm, ph } = sample;
  if (ppm !== null && !(Number.isFinite(ppm) && ppm >= 0)) {
    throw new RangeError(`TDS must be a number of ppm, 0 or more (got ${ppm})`);
  }
  if (ph !== null && !(Number.isFinite(ph) && ph >= 0 && ph <= 14)) {
    throw new RangeError(`pH must be between 0 and 14 (got ${ph})`);
  }

  const reasons: string[] = [];
  let tooSalty = false;
  let needsWork = false;

  if (ppm === null) {
    needsWork = true;
    reasons.push("Dissolved solids (TDS) not measured yet.");
  } else if (ppm > ROUTINE_WATERING_MAX_PPM) {
    tooSalty = true;
    reasons.push(
      `${formatNumber(ppm, 1)} ppm is over ${ROUTINE_WATERING_MAX_PPM} ppm: too much dissolved ` +
        `mineral for routine watering of orchids, it builds up in the pot. Growers mix in or ` +
        `switch to rain or filtered water.`,
    );
  } else {
    reasons.push(
      `${formatNumber(ppm, 1)} ppm is at or under the ${ROUTINE_WATERING_MAX_PPM} ppm growers use as ` +
        `the limit for routine watering.`,
    );
  }

  if (ph === null) {
    needsWork = true;
    reasons.push("pH not measured yet.");
  } else if (ph < PH_MIN) {
    needsWork = true;
    reasons.push(`pH ${formatNumber(ph, 1)} is more acidic than the ${PH_MIN}–${PH_MAX} growers aim for.`);
  } else if (ph > PH_MAX) {
    needsWork = true;
    reasons.push(`pH ${formatNumber(ph, 1)} is more alkaline than the ${PH_MIN}–${PH_MAX} growers aim for.`);
  } else {
    reasons.push(`pH ${formatNumber(ph, 1)} is in the ${PH_MIN}–${PH_MAX} range growers aim for.`);
  }

  const verdict: WaterVerdict = tooSalty ? "avoid" : needsWork ? "adjust" : "good";
  return { verdict, reasons };
}
