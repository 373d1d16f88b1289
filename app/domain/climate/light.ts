// Light arithmetic for hobby lux sensors. A lux meter weighs light by the human eye, plants count
// photons in 400–700 nm, so the conversion depends on the light source's spectrum.
import { LIGHT_SOURCES, type LightSource } from "~/domain/vocabulary";

/**
 * Lux per µmol m⁻² s⁻¹ of PPFD (400–700 nm), from Thimijan & Heins (1983), "Photometric,
 * radiometric, and quantum light units of measure: a review of procedures for interconversion",
 * HortScience 18, 818–822. Sun and sky daylight.
 */
export const SUNLIGHT_LUX_PER_PPFD = 54;

/**
 * Other sources from the same table (as reproduced in secondary tables that cite it). White LEDs
 * are not in it and vary by make: see WHITE_LED_LUX_PER_PPFD.
 */
export const LUX_PER_PPFD = {
  sunlight: SUNLIGHT_LUX_PER_PPFD,
  coolWhiteFluorescent: 74,
  highPressureSodium: 82,
  metalHalide: 71,
  incandescent: 50,
} as const;

/**
 * White LEDs are not in Thimijan & Heins' table. Ordinary white LEDs (about 2,700–6,500 K) come to
 * roughly 65–75 lux per µmol m⁻² s⁻¹ when computed from their spectra; 70 is the middle of that
 * (memory, after Ashdown's spectral tables, "Photometry and Photosynthesis", 2014–2021). A make's
 * own PPFD figure beats it.
 */
export const WHITE_LED_LUX_PER_PPFD = 70;

/**
 * Lux per µmol m⁻² s⁻¹ for each light source a grower can pick. Sun (through a window or outdoors)
 * and cool-white fluorescent tubes from Thimijan & Heins (1983) via LUX_PER_PPFD; white LED as
 * above; "mixed" (daylight plus lamps) halfway between sun and white LED, so its DLI is off by at
 * most about 13 % whichever dominates (our choice, not a published figure).
 */
export const LIGHT_SOURCE_LUX_PER_PPFD: Readonly<Record<LightSource, number>> = {
  sun: LUX_PER_PPFD.sunlight,
  led: WHITE_LED_LUX_PER_PPFD,
  fluorescent: LUX_PER_PPFD.coolWhiteFluorescent,
  mixed: (LUX_PER_PPFD.sunlight + WHITE_LED_LUX_PER_PPFD) / 2,
};

export const LIGHT_SOURCE_LABELS: Readonly<Record<LightSource, string>> = {
  sun: "Daylight (through a window or outdoors)",
  led: "White LED lamps",
  fluorescent: "Fluorescent tubes",
  mixed: "Daylight and lamps together",
};

/** The factor for a light source; anything unknown counts as sunlight, the default. */
export function luxPerPpfdFor(source: string | null | undefined): number {
  return (LIGHT_SOURCES as readonly string[]).includes(source ?? "")
    ? LIGHT_SOURCE_LUX_PER_PPFD[source as LightSource]
    : SUNLIGHT_LUX_PER_PPFD;
}

/** 1 foot-candle = 1 lm/ft² = 1/0.3048² lux (international foot, exact). */
export const LUX_PER_FOOT_CANDLE = 1 / (0.3048 * 0.3048);

const SECONDS_PER_HOUR = 3600;
const MICROMOL_PER_MOL = 1e6;

/** PPFD, µmol m⁻² s⁻¹, from illuminance; `luxPerPpfd` defaults to sunlight. */
export function luxToPpfd(lux: number, luxPerPpfd: number = SUNLIGHT_LUX_PER_PPFD): number {
  return lux / luxPerPpfd;
}

export function footCandlesToLux(footCandles: number): number {
  return footCandles * LUX_PER_FOOT_CANDLE;
}

export function luxToFootCandles(lux: number): number {
  return lux / LUX_PER_FOOT_CANDLE;
}

/**
 * Daily light integral, mol m⁻² d⁻¹, of a steady PPFD for a number of hours: PPFD × 0.0036 × h
 * (Torres & Lopez, Purdue Extension HO-238-W).
 */
export function dliFromConstantPpfd(ppfd: number, hours: number): number {
  return (ppfd * SECONDS_PER_HOUR * hours) / MICROMOL_PER_MOL;
}

/**
 * Daily light integral, mol m⁻² d⁻¹, from hourly mean illuminance: Σ PPFD·3600 s / 10⁶.
 * Each element is the mean lux over one hour (an hourly rollup's sum / count). Hours that are not
 * finite or are negative (no data) are skipped, so a day with gaps gives a lower bound; whether
 * enough hours are present is the caller's call.
 */
export function dliFromHourlyMeanLux(
  hourlyMeanLux: readonly number[],
  luxPerPpfd: number = SUNLIGHT_LUX_PER_PPFD,
): number {
  let molPerM2 = 0;
  for (const lux of hourlyMeanLux) {
    if (!Number.isFinite(lux) || lux < 0) continue;
    molPerM2 += (luxToPpfd(lux, luxPerPpfd) * SECONDS_PER_HOUR) / MICROMOL_PER_MOL;
  }
  return molPerM2;
}

/**
 * DLI of a clear day whose light rises and falls as a half sine from dawn to dusk, peaking at
 * `peakLux` of daylight: the mean of a half sine is 2/π of its peak. Used to put growers' midday
 * lux figures and sensor-measured DLI on one scale.
 */
export function dliFromPeakLuxSineDay(peakLux: number, dayLengthHours: number): number {
  return dliFromConstantPpfd((luxToPpfd(peakLux) * 2) / Math.PI, dayLengthHours);
}

export type LightBandName = "low" | "medium" | "high";

export interface LightBand {
  readonly name: LightBandName;
  /** Bright midday illuminance in the growing spot, lux. */
  readonly middayLuxMin: number;
  readonly middayLuxMax: number;
  /** The same band as DLI for a 12 h half-sine day (see dliFromPeakLuxSineDay). */
  readonly dliMin: number;
  readonly dliMax: number;
  readonly examples: readonly string[];
}

const BAND_DAY_HOURS = 12;

function band(name: LightBandName, fcMin: number, fcMax: number, examples: string[]): LightBand {
  const middayLuxMin = footCandlesToLux(fcMin);
  const middayLuxMax = footCandlesToLux(fcMax);
  return {
    name,
    middayLuxMin,
    middayLuxMax,
    dliMin: dliFromPeakLuxSineDay(middayLuxMin, BAND_DAY_HOURS),
    dliMax: dliFromPeakLuxSineDay(middayLuxMax, BAND_DAY_HOURS),
    examples,
  };
}

/**
 * Orchid light bands as growers quote them, in midday foot-candles: low 1,000–1,500 fc,
 * medium 1,500–3,000 fc, high 3,000–5,000 fc. Common practice; the figures and the example genera
 * are from memory of grower-society culture sheets. The DLI ranges are computed from them, not
 * published.
 */
export const ORCHID_LIGHT_BANDS: readonly LightBand[] = [
  band("low", 1000, 1500, ["Phalaenopsis", "Paphiopedilum"]),
  band("medium", 1500, 3000, ["Oncidium", "Cattleya"]),
  band("high", 3000, 5000, ["Vanda"]),
];

export type LightBandPlacement = LightBandName | "below-low" | "above-high";

/** Which orchid light band a measured DLI falls in; band edges belong to the brighter band. */
export function lightBandForDli(dli: number): LightBandPlacement {
  const [low, , high] = ORCHID_LIGHT_BANDS;
  if (dli < low.dliMin) return "below-low";
  if (dli > high.dliMax) return "above-high";
  for (let i = ORCHID_LIGHT_BANDS.length - 1; i >= 0; i--) {
    if (dli >= ORCHID_LIGHT_BANDS[i].dliMin) return ORCHID_LIGHT_BANDS[i].name;
  }
  return "below-low";
}
