/** One hourly rollup per spot-hour as stored (calibrated values). */
export type HourlyRollup = {
  hour: Date; // UTC instant of the start of the local hour
  tN: number;
  tMin: number | null;
  tMax: number | null;
  tSum: number | null; // temperature °C
  hN: number;
  hMin: number | null;
  hMax: number | null;
  hSum: number | null; // relative humidity %
  dpMarginMin: number | null; // lowest (air temperature − dew point) in the hour, °C
  /** Readings of the hour with a dew-point margin, and those under CONDENSATION_MARGIN_C (0 in rollups older than the count). */
  dpN?: number;
  dpUnderN?: number;
  luxN: number;
  luxSum: number | null; // lux samples in the hour and their sum (mean = luxSum/luxN)
  /** The hour's highest lux sample; absent or null in rollups older than the column (the hour's mean stands in). */
  luxMax?: number | null;
};

/**
 * A light sensor that tops out: many hours whose highest reading sits at one ceiling (a flat top),
 * as a cheap lux chip does near 55 klux in direct sun. The sunniest hours read low, so the DLI of
 * the hours counted is a lower bound.
 */
export type LuxClipping = {
  /** The ceiling, lux: the highest hourly reading of the whole profile. */
  ceilingLux: number;
  /** Hours (of this period) whose highest reading reached the ceiling. */
  hours: number;
  /** Local days with at least one such hour. */
  days: number;
};

export type Site = { latitude: number; longitude: number; timeZone: string }; // IANA zone

export type Hemisphere = "northern" | "southern";
export type SeasonName = "winter" | "spring" | "summer" | "autumn";

export type ThresholdCount = {
  thresholdC: number;
  /** Hours whose hourly mean temperature was below the threshold. */
  hours: number;
  /** Nights (NIGHT_START_HOUR to NIGHT_END_HOUR local, by the date they start) with a reading below the threshold. */
  nights: number;
};

export type Coverage = {
  hoursObserved: number;
  /** Local days with at least MIN_HOURS_FOR_DAY hours of temperature. */
  daysObserved: number;
  /** Calendar days of the period's months (full months, whatever the requested range). */
  daysInPeriod: number;
  /** Calendar days of the period that fall inside the requested range. */
  daysInRange: number;
  enough: boolean;
};

export type PeriodStats = {
  temperature: {
    lowest: number | null;
    highest: number | null;
    /** Percentiles of hourly mean temperature (hour-weighted), not of raw samples. */
    p05: number | null;
    p95: number | null;
    meanDailyLow: number | null;
    meanDailyHigh: number | null;
    meanDayNightDifference: number | null;
    daysWithDayAndNight: number;
  };
  humidity: { lowest: number | null; highest: number | null; mean: number | null };
  below: ThresholdCount[];
  /** Time the readings spent under CONDENSATION_MARGIN_C, hours (to 0.1 h). */
  condensationHours: number;
  /** Mean daily light integral, mol m⁻² d⁻¹, with the spot's light source's lux → PPFD factor. */
  light: { meanDli: number | null; daysWithLight: number };
  /** Hours of this period at the light sensor's ceiling; null when the sensor does not clip or never reached it here. */
  luxClipped: LuxClipping | null;
  coverage: Coverage;
};

export type MonthProfile = PeriodStats & {
  key: string; // "2026-01"
  year: number;
  month: number; // 1–12
};

export type SeasonPeriodProfile = PeriodStats & {
  key: string; // "2025-12/2026-02"
  season: SeasonName;
  label: string; // "winter 2025–26"
  months: string[]; // month keys of the season inside the range
};

export type MonthOfYearProfile = PeriodStats & {
  key: string; // "01"
  month: number; // 1–12
  name: string; // "January"
  monthsIncluded: string[]; // month keys aggregated, e.g. ["2025-01", "2026-01"]
};

export type DaySummary = {
  key: string; // "2026-01-05", local calendar day
  monthKey: string;
  month: number; // 1–12
  /** Sequential local day number (days since 1970-01-01 in local time), for runs and windows. */
  dayNumber: number;
  hoursObserved: number;
  /** Whether the day has enough hours to count as observed. */
  complete: boolean;
  low: number | null;
  high: number | null;
  dayHours: number;
  nightHours: number;
  dayNightDifference: number | null;
  lightHours: number;
  /** Only for days with at least MIN_LIGHT_HOURS_FOR_DLI hours of light samples. */
  dli: number | null;
  /** The day's hourly mean temperatures, °C (for degree-hours past a line). */
  temps?: number[];
  /** The day's lowest relative humidity, % (the dry part of the day). */
  rhLow?: number | null;
};

/** A night: from NIGHT_START_HOUR on its date to NIGHT_END_HOUR the next morning, local time. */
export type NightSummary = {
  key: string; // local date the night starts, "2026-01-05"
  month: number; // 1–12, of that date
  dayNumber: number;
  hoursObserved: number;
  low: number;
  /** The night's hourly mean temperatures, °C (for hours and degree-hours under a line). */
  temps?: number[];
};

export type SeasonProfile = {
  timeZone: string;
  hemisphere: Hemisphere;
  from: Date;
  to: Date;
  thresholds: number[];
  /** Lux per µmol m⁻² s⁻¹ the DLI figures used (the spot's light source; 54 for sunlight). */
  luxPerPpfd: number;
  /** Whether the light sensor clipped anywhere in the profile (hours and days over the whole period). */
  luxClipped: LuxClipping | null;
  months: MonthProfile[];
  seasons: SeasonPeriodProfile[];
  /** All Januaries together, all Februaries together, … — the profile a grower reads. */
  year: MonthOfYearProfile[];
  days: DaySummary[];
  /** Nights with a temperature reading, in order. */
  nights: NightSummary[];
};
