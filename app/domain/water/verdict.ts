// Checking a water source before it goes on orchids. The thresholds are growers' rules of thumb
// (common practice), not published standards.

/**
 * ppm per µS/cm on a TDS meter's scale: 0.5 for the NaCl scale, 0.7 for the "442" scale (a mix of
 * sodium sulfate, sodium bicarbonate and sodium chloride). Common practice; the meter's manual says
 * which one it uses. A TDS meter measures conductivity and multiplies by its scale, so the same
 * water reads 1.4 times higher on a 0.7 meter than on a 0.5 one.
 */
export type TdsScale = 0.5 | 0.7;

export const TDS_SCALE_NACL: TdsScale = 0.5;
export const TDS_SCALE_442: TdsScale = 0.7;
export const TDS_SCALES: readonly TdsScale[] = [TDS_SCALE_NACL, TDS_SCALE_442];

/**
 * The routine-watering rule, stated once in conductivity so it does not move with the meter's
 * scale: water above 200 µS/cm is not for routine watering of orchids. Common practice: growers
 * quote it as "100 ppm", which is 200 µS/cm on the NaCl (0.5) scale; on a 442 (0.7) meter the
 * same line reads 140 ppm (see routineLimitPpm).
 */
export const ROUTINE_WATERING_MAX_EC = 200;
/**
 * Under this conductivity water has almost no carbonate buffer (rain, reverse-osmosis, distilled
 * water run about 5–50 µS/cm): its pH drifts with the air's carbon dioxide, meters read it
 * unsteadily, and the potting mix and fertiliser set the pH at the roots. So its pH is not judged.
 * Common practice; 100 µS/cm is our line with room above typical rain and RO water.
 */
export const UNBUFFERED_MAX_EC = 100;
/** Irrigation water pH range growers aim for, for water with buffer (common practice). */
export const PH_MIN = 5.5;
export const PH_MAX = 6.5;

/** Total dissolved solids, ppm, from electrical conductivity in µS/cm on the given meter scale. */
export function ecToPpm(ecMicroSiemensPerCm: number, scale: TdsScale): number {
  return ecMicroSiemensPerCm * scale;
}

/** Conductivity, µS/cm, behind a TDS reading on the given meter scale. */
export function ppmToEc(ppm: number, scale: TdsScale): number {
  return ppm / scale;
}

/** The routine-watering line as a TDS meter on `scale` shows it: 100 ppm (0.5) or 140 ppm (0.7). */
export function routineLimitPpm(scale: TdsScale): number {
  return Math.round(ecToPpm(ROUTINE_WATERING_MAX_EC, scale) * 10) / 10;
}

/**
 * "good": fine for routine watering. "adjust": usable once the pH is brought into range, or a
 * value is missing (or the meter's scale decides it) so it cannot be called good yet. "avoid":
 * too much dissolved mineral for routine watering — salts build up in the pot.
 */
export type WaterVerdict = "good" | "adjust" | "avoid";

export interface WaterSample {
  /** Conductivity from an EC meter, µS/cm; null or absent when the meter showed ppm. */
  ec?: number | null;
  /** Total dissolved solids from a TDS meter, ppm; null when not measured. */
  ppm: number | null;
  /** The TDS meter's scale, when known; an unknown scale leaves a range of conductivity. */
  scale?: TdsScale | null;
  /** null when not measured. */
  ph: number | null;
}

export interface WaterAssessment {
  verdict: WaterVerdict;
  reasons: string[];
  /** The conductivity the reading stands for, µS/cm: one value, or a range when the TDS meter's scale is unknown. */
  ecLow: number | null;
  ecHigh: number | null;
  /** Whether the pH was judged: not for water without buffer. null when unknown (no EC or TDS). */
  buffered: boolean | null;
}

function formatNumber(value: number, digits: number): string {
  return Number(value.toFixed(digits)).toString();
}

/** The conductivity a sample stands for: exact for an EC meter or a TDS meter of known scale, else a range. */
export function sampleEc(sample: WaterSample): { low: number; high: number } | null {
  if (sample.ec != null) return { low: sample.ec, high: sample.ec };
  if (sample.ppm == null) return null;
  if (sample.scale) return { low: ppmToEc(sample.ppm, sample.scale), high: ppmToEc(sample.ppm, sample.scale) };
  return { low: ppmToEc(sample.ppm, TDS_SCALE_442), high: ppmToEc(sample.ppm, TDS_SCALE_NACL) };
}

const LIMIT_TEXT =
  `${ROUTINE_WATERING_MAX_EC} µS/cm (` +
  `${routineLimitPpm(TDS_SCALE_NACL)} ppm on a 0.5 meter, ` +
  `${routineLimitPpm(TDS_SCALE_442)} ppm on a 0.7 meter)`;

/**
 * Verdict and plain-word reasons for one water check. A value exactly on a threshold is within
 * it: the rule is "over 200 µS/cm", and 5.5 and 6.5 are inside the pH range.
 * Throws RangeError for values no meter can read (negative EC or ppm, pH outside 0–14), which
 * means a typing slip rather than a water problem.
 */
export function waterVerdict(sample: WaterSample): WaterAssessment {
  const { ppm, ph } = sample;
  const ec = sample.ec ?? null;
  if (ppm !== null && !(Number.isFinite(ppm) && ppm >= 0)) {
    throw new RangeError(`TDS must be a number of ppm, 0 or more (got ${ppm})`);
  }
  if (ec !== null && !(Number.isFinite(ec) && ec >= 0)) {
    throw new RangeError(`EC must be a number of µS/cm, 0 or more (got ${ec})`);
  }
  if (ph !== null && !(Number.isFinite(ph) && ph >= 0 && ph <= 14)) {
    throw new RangeError(`pH must be between 0 and 14 (got ${ph})`);
  }

  const reasons: string[] = [];
  let tooSalty = false;
  let needsWork = false;
  const range = sampleEc(sample);
  const shown =
    ec !== null
      ? `${formatNumber(ec, 0)} µS/cm`
      : ppm !== null && sample.scale
        ? `${formatNumber(ppm, 1)} ppm on a ${sample.scale} meter (${formatNumber(ppmToEc(ppm, sample.scale), 0)} µS/cm)`
        : `${formatNumber(ppm ?? 0, 1)} ppm`;

  if (range === null) {
    needsWork = true;
    reasons.push("Dissolved solids (TDS or EC) not measured yet.");
  } else if (range.low > ROUTINE_WATERING_MAX_EC) {
    tooSalty = true;
    reasons.push(
      `${shown} is over ${LIMIT_TEXT}: too much dissolved mineral for routine watering of orchids, ` +
        `it builds up in the pot. Growers mix in or switch to rain or filtered water.`,
    );
  } else if (range.high <= ROUTINE_WATERING_MAX_EC) {
    reasons.push(`${shown} is within the ${LIMIT_TEXT} growers use as the limit for routine watering.`);
  } else {
    needsWork = true;
    reasons.push(
      `${shown} is within the routine-watering limit on a 0.7 meter but over it on a 0.5 meter ` +
        `(${LIMIT_TEXT}): give the meter's scale (its manual says which) to settle it.`,
    );
  }

  const buffered = range === null ? null : range.high > UNBUFFERED_MAX_EC;
  if (ph === null) {
    // Water without buffer needs no pH reading to be called good.
    if (buffered !== false) {
      needsWork = true;
      reasons.push("pH not measured yet.");
    }
  } else if (buffered === false) {
    reasons.push(
      `pH ${formatNumber(ph, 1)} is not judged: water this low in minerals (under ${UNBUFFERED_MAX_EC} µS/cm, ` +
        `like rain or RO water) has almost no buffer, so its pH drifts with the air and means little; ` +
        `the potting mix and fertiliser set the pH at the roots (common practice).`,
    );
  } else {
    const unknownBuffer =
      buffered === null ? ` If this is rain or RO water, its pH means little: measure TDS or EC to tell.` : "";
    if (ph < PH_MIN) {
      needsWork = true;
      reasons.push(
        `pH ${formatNumber(ph, 1)} is more acidic than the ${PH_MIN}–${PH_MAX} growers aim for.${unknownBuffer}`,
      );
    } else if (ph > PH_MAX) {
      needsWork = true;
      reasons.push(
        `pH ${formatNumber(ph, 1)} is more alkaline than the ${PH_MIN}–${PH_MAX} growers aim for.${unknownBuffer}`,
      );
    } else {
      reasons.push(`pH ${formatNumber(ph, 1)} is in the ${PH_MIN}–${PH_MAX} range growers aim for.`);
    }
  }

  const verdict: WaterVerdict = tooSalty ? "avoid" : needsWork ? "adjust" : "good";
  return { verdict, reasons, ecLow: range?.low ?? null, ecHigh: range?.high ?? null, buffered };
}
