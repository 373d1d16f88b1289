// The lines a season profile counts by: when a day, a month or a light integral has enough data,
// the condensation margin, the light sensor's ceiling, the default cold line, and when a night
// runs.
/** A local day counts as observed with this many hours of temperature (of 23–25). */
export const MIN_HOURS_FOR_DAY = 18;
/**
 * Coverage rule: a month (or all Januaries together, etc.) has enough data when at least this
 * many of its days are observed — two thirds of a month, so a week's gap can't hide a cold spell.
 * A season has enough when each of its three months has.
 */
export const MIN_DAYS_FOR_MONTH = 20;
/** A day's light integral is used only with this many hours of light samples. */
export const MIN_LIGHT_HOURS_FOR_DLI = 20;
/** Dew-point margin under which glass and leaves are taken to be wet (brief). */
export const CONDENSATION_MARGIN_C = 2;
/**
 * Lux per µmol m⁻² s⁻¹ for sunlight — Thimijan & Heins (1983), HortScience 18, 818–822. The
 * default; a spot lit by lamps uses its light source's factor (LIGHT_SOURCE_LUX_PER_PPFD).
 */
export const SUNLIGHT_LUX_PER_PPFD = 54;
/**
 * Clipping: a light sensor clips when at least CLIP_MIN_HOURS hours on CLIP_MIN_DAYS days have
 * their highest reading within CLIP_TOLERANCE of the profile's highest, and no fewer hours sit in
 * the 10 % just under it. Natural light has a thin, sloping top (a few hours come close to the
 * brightest, many more a little lower); a saturated chip piles its hours on one value. Lamps are
 * flat by nature, so spots lit by LED or fluorescent tubes alone are not checked. Our rule, not a
 * published one; the ceiling must be at least CLIP_MIN_LUX, well above any lamp-free room's light.
 */
export const CLIP_TOLERANCE = 0.002;
export const CLIP_MIN_HOURS = 5;
export const CLIP_MIN_DAYS = 2;
export const CLIP_MIN_LUX = 1_000;
export const DEFAULT_THRESHOLDS_C = [10];
/**
 * A night runs from 18:00 to 08:00 the next morning, local time, and belongs to the date it starts
 * on: one cold spell from 22:00 to 06:00 is one night, not two calendar days (common practice: the
 * grower's "night of the 5th" ends on the morning of the 6th).
 */
export const NIGHT_START_HOUR = 18;
export const NIGHT_END_HOUR = 8;
