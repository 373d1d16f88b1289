// Cold glass: the inside surface temperature of a window pane, from the indoor and outdoor air
// temperatures and the glazing's U-value, with the interior surface resistance of ISO 6946:2017,
// Table 7 (EN ISO 6946): R_si = 0.13 m²K/W for a vertical surface with horizontal heat flow.
//   T_si = T_in − U · R_si · (T_in − T_out)
// Check (REFERENCES.md, computed): 20 °C in, 0 °C out, U 2.8 → 12.7 °C; U 5.8 → 4.9 °C.
import { dewPoint } from "~/domain/climate/psychro";

/** Interior surface resistance, m²K/W: ISO 6946:2017, Table 7, horizontal heat flow. */
export const R_SI = 0.13;

/**
 * Typical centre-of-pane U-values, W/m²K (*memory*; check against EN 673 or a glazing maker's
 * table): single ≈ 5.8, old air-filled double ≈ 2.8, low-e argon double ≈ 1.2, triple ≈ 0.7.
 */
export const GLAZING_U = { single: 5.8, old_double: 2.8, double: 1.2, triple: 0.7 } as const;

/** Glazing with a pane to judge (a spot's `glazing` may also be "none", or not given). */
export type Glazing = keyof typeof GLAZING_U;

/** The pane's inside surface temperature, °C. */
export function paneInsideC(indoorC: number, outdoorC: number, uValue: number): number {
  return indoorC - uValue * R_SI * (indoorC - outdoorC);
}

/**
 * How far the pane sits above the room air's dew point, K (negative: water condenses on it).
 * The air at `indoorC` and `rh` % holds its dew point; the glass is colder than the air.
 */
export function paneDewMarginC(indoorC: number, rh: number, outdoorC: number, uValue: number): number {
  return paneInsideC(indoorC, outdoorC, uValue) - dewPoint(indoorC, rh);
}
