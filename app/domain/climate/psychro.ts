// Humidity arithmetic for hobby sensors, in the Magnus form of Alduchov & Eskridge (1996),
// "Improved Magnus form approximation of saturation vapor pressure", J. Appl. Meteor. 35, 601–609.
// The paper fits the water set over −40…50 °C; that covers every spot a grower measures.

export interface MagnusConstants {
  /** Saturation vapour pressure at 0 °C, hPa. */
  readonly c: number;
  readonly a: number;
  /** °C */
  readonly b: number;
}

export const MAGNUS_WATER: MagnusConstants = { c: 6.1094, a: 17.625, b: 243.04 };

function magnus(tC: number, k: MagnusConstants): number {
  return k.c * Math.exp((k.a * tC) / (k.b + tC));
}

/** Saturation vapour pressure over liquid water, hPa. */
export function saturationVapourPressure(tC: number): number {
  return magnus(tC, MAGNUS_WATER);
}

/**
 * Relative humidity as the formulas use it, or NaN when the reading cannot describe real air.
 * Cheap sensors overshoot to 100.x % in fog or after a shower, so values above 100 are read as
 * saturation. A value of 0 % or less is a sensor fault rather than very dry air (room air never
 * gets there), and ln(0) has no dew point: such readings give NaN, which callers drop with
 * Number.isFinite, rather than a made-up number.
 */
function usableRh(rh: number): number {
  if (!Number.isFinite(rh) || rh <= 0) return Number.NaN;
  return Math.min(rh, 100);
}

/**
 * Dew point over liquid water, °C. RH above 100 counts as 100; RH ≤ 0 or non-finite gives NaN.
 * Never above the air temperature (guards against rounding at 100 %).
 */
export function dewPoint(tC: number, rh: number): number {
  const k = MAGNUS_WATER;
  const gamma = Math.log(usableRh(rh) / 100) + (k.a * tC) / (k.b + tC);
  return Math.min((k.b * gamma) / (k.a - gamma), tC);
}

/**
 * Air temperature minus dew point, K. A small margin means condensation on cold glass and leaves.
 * NaN where dewPoint is NaN (RH ≤ 0): the reading says nothing about condensation.
 */
export function dewPointMargin(tC: number, rh: number): number {
  return tC - dewPoint(tC, rh);
}

export function cToF(tC: number): number {
  return (tC * 9) / 5 + 32;
}

export function fToC(tF: number): number {
  return ((tF - 32) * 5) / 9;
}
