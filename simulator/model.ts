// Deterministic sensor simulator: an outdoor climate for a site and the readings a cheap
// temperature/humidity(/light) sensor would send from one spot of that site.
//
// Everything is a closed-form function of the absolute time (plus seeds), never of the
// start of a run, so a backfill and a live run that overlap produce the same readings at the
// same instants — exactly what ingest deduplication must cope with.
import * as SunCalc from "suncalc";
import { FACING_AZIMUTH } from "~/domain/climate/sun";
import { zoneClock } from "~/domain/season/local-time";
import { mulberry32 } from "~/lib/random";

export type SpotKind = "outdoor" | "windowsill" | "bathroom" | "heated-room" | "room";
export type Facing = "N" | "NE" | "E" | "SE" | "S" | "SW" | "W" | "NW" | "none";
export type SimSite = { latitude: number; longitude: number; timeZone: string };
export type SimSpot = { kind: SpotKind; facing: Facing; hasLight: boolean };
export type SimReading = {
  measuredAt: Date;
  temperature: number;
  humidity: number;
  lux?: number;
  battery: number;
};
export type ColdFront = {
  /** When the fall begins. */
  start: Date;
  /** How far the air falls below where it was at `start`, °C. */
  dropC: number;
  /** Hours the air is held at the bottom, between the 3 h fall and the 3 h recovery. */
  hours: number;
};
export type Scenario = {
  seed: number;
  /** Mean of the year, °C. */
  annualMeanC: number;
  /** Half the swing between the coldest and warmest time of year (sine amplitude), °C. */
  annualAmplitudeC: number;
  /** Typical half-range of the day (sine amplitude), °C; larger on clear and summer days. */
  dailyAmplitudeC: number;
  /** Coldest day of the year as seen in the northern hemisphere; a southern site is shifted by half a year. */
  coldestDayOfYear: number;
  /** Multi-day cold snaps and heat waves plus day-to-day wobble. */
  fronts: boolean;
  coldFront?: ColdFront;
};
export type OutdoorSample = { temperature: number; humidity: number; sunElevation: number };
export type GenerateOptions = {
  from: Date;
  to: Date;
  intervalMs: number;
  sensorSeed: number;
  /** Duplicates and out-of-order sends, as a live radio link produces them. */
  artifacts?: boolean;
  /** When the battery was new; defaults to `from`. */
  installedAt?: Date;
};

const MINUTE = 60_000;
const HOUR = 3_600_000;
const DAY = 86_400_000;
const YEAR_DAYS = 365.25;
const RAD = Math.PI / 180;

// ---------------------------------------------------------------------------------------------
// Deterministic randomness: a stateless hash for "value at this instant" and mulberry32 where
// one seed must yield several draws. No Math.random anywhere.

function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

/** Hash of a seed, an integer key (may exceed 32 bits, e.g. milliseconds) and a salt. */
function hash3(seed: number, key: number, salt: number): number {
  const hi = Math.floor(key / 4294967296);
  const lo = key - hi * 4294967296;
  let h = fmix32((seed ^ 0x9e3779b9) >>> 0);
  h = fmix32((h ^ lo) >>> 0);
  h = fmix32((h ^ Math.imul(hi, 0x27d4eb2d) ^ Math.imul(salt, 0x165667b1)) >>> 0);
  return h;
}

function unit(seed: number, key: number, salt: number): number {
  return hash3(seed, key, salt) / 4294967296;
}

/** Symmetric triangular noise in [-1, 1], mean 0 — bounded, so a ±0.2 °C sensor never reads 0.5 off. */
function triangular(seed: number, key: number, salt: number): number {
  return unit(seed, key, salt) + unit(seed, key, salt + 1) - 1;
}

const SALT = {
  front: 11,
  dayWobble: 12,
  cloud: 13,
  dewDepression: 14,
  sunnySpell: 15,
  lamp: 16,
  lampLevel: 17,
  showerMorning: 18,
  showerEvening: 19,
  noiseT: 30,
  noiseRh: 32,
  noiseLux: 34,
  wind: 20,
  windHour: 21,
  dropout: 40,
  duplicate: 50,
  swap: 51,
  batteryLife: 60,
} as const;

function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : x > hi ? hi : x;
}

function smoothstep(x: number): number {
  const c = clamp(x, 0, 1);
  return c * c * (3 - 2 * c);
}

function round1(x: number): number {
  return Math.round(x * 10) / 10;
}

/**
 * Saturation vapour pressure over water, hPa — Magnus form with the Alduchov & Eskridge (1996)
 * constants. Sensors report RH relative to water even below 0 °C, so no ice branch here.
 */
export function saturationVapourPressureHpa(temperatureC: number): number {
  return 6.1094 * Math.exp((17.625 * temperatureC) / (243.04 + temperatureC));
}

function relativeHumidity(dewPointC: number, temperatureC: number): number {
  return (100 * saturationVapourPressureHpa(dewPointC)) / saturationVapourPressureHpa(temperatureC);
}

// ---------------------------------------------------------------------------------------------
// Outdoor climate

type DayState = {
  sunrise: number;
  sunset: number;
  solarNoon: number;
  declination: number;
  mean: number;
  tMin: number;
  tMax: number;
  dewPoint: number;
  /** 0 clear … 1 overcast. */
  cloud: number;
  /** A big anomaly: settled air, clear and still. */
  settled: boolean;
};

// Parton & Logan (1981), "A model for diurnal variation in soil and air temperature",
// Agric. Meteorol. 23, 205–216: sine by day peaking `LAG` after solar noon, exponential fall by
// night. Coefficients for air at screen height are from memory (a ≈ 1.86 h, b ≈ 2.2).
const DAY_PEAK_LAG_H = 1.9;
const NIGHT_DECAY = 2.2;
const NIGHT_DECAY_NORM = 1 - Math.exp(-NIGHT_DECAY);

const FRONT_BIN_DAYS = 6;
const FRONT_FALL_MS = 3 * HOUR;
const FRONT_RECOVERY_MS = 3 * HOUR;

/** Spencer (1971) Fourier series for solar declination (the one NOAA's calculator uses), radians. */
function declination(dayOfYear: number): number {
  const g = (2 * Math.PI * (dayOfYear - 1)) / 365;
  return (
    0.006918 -
    0.399912 * Math.cos(g) +
    0.070257 * Math.sin(g) -
    0.006758 * Math.cos(2 * g) +
    0.000907 * Math.sin(2 * g) -
    0.002697 * Math.cos(3 * g) +
    0.00148 * Math.sin(3 * g)
  );
}

function fractionalDayOfYear(t: number): number {
  const year = new Date(t).getUTCFullYear();
  return (t - Date.UTC(year, 0, 1)) / DAY + 1;
}

/** Same refraction correction suncalc applies (Meeus 16.4), so elevations compare like for like. */
function refraction(h: number): number {
  const hh = h < 0 ? 0 : h;
  return 0.0002967 / Math.tan(hh + 0.00312536 / (hh + 0.08901179));
}

type FrontEvent = { start: number; plateau: number; delta: number };

class Climate {
  private readonly sinPhi: number;
  private readonly cosPhi: number;
  private readonly phi: number;
  private readonly solarShiftMs: number;
  private readonly coldestDay: number;
  private readonly days = new Map<number, DayState>();
  private readonly frontEvents = new Map<number, FrontEvent | null>();
  private frontAnchor: number | undefined;

  constructor(
    readonly site: SimSite,
    readonly scenario: Scenario,
  ) {
    this.phi = site.latitude * RAD;
    this.sinPhi = Math.sin(this.phi);
    this.cosPhi = Math.cos(this.phi);
    this.solarShiftMs = (site.longitude / 360) * DAY;
    this.coldestDay = scenario.coldestDayOfYear + (site.latitude < 0 ? YEAR_DAYS / 2 : 0);
  }

  /** Index of the local mean-solar day, so each day's sunrise and sunset fall inside it. */
  dayIndex(t: number): number {
    return Math.floor((t + this.solarShiftMs) / DAY);
  }

  day(d: number): DayState {
    let state = this.days.get(d);
    if (state === undefined) {
      state = this.computeDay(d);
      this.days.set(d, state);
    }
    return state;
  }

  private computeDay(d: number): DayState {
    const approxNoon = d * DAY + DAY / 2 - this.solarShiftMs;
    const times = SunCalc.getTimes(new Date(approxNoon), this.site.latitude, this.site.longitude);
    const solarNoon = times.solarNoon.getTime();
    const dayOfYear = fractionalDayOfYear(solarNoon);
    const decl = declination(dayOfYear);

    let sunrise = times.sunrise?.getTime() ?? NaN;
    let sunset = times.sunset?.getTime() ?? NaN;
    if (!Number.isFinite(sunrise) || !Number.isFinite(sunset)) {
      // Polar day or night: the temperature still needs a warm and a cold part of the day.
      const sunUp = times.alwaysUp ?? Math.sin(this.phi) * Math.sin(decl) > 0;
      const half = (sunUp ? 10 : 2) * HOUR;
      sunrise = solarNoon - half;
      sunset = solarNoon + half;
    }

    const phase = (2 * Math.PI * (dayOfYear - this.coldestDay)) / YEAR_DAYS;
    const summerness = (1 - Math.cos(phase)) / 2;
    const { annualMeanC, annualAmplitudeC, dailyAmplitudeC, seed, fronts } = this.scenario;
    const anomaly = fronts ? this.frontAnomaly(d, summerness) + 2.4 * (unit(seed, d, SALT.dayWobble) - 0.5) : 0;

    // Big anomalies come with settled air: frosty clear nights, sunny heat waves.
    let cloud = unit(seed, d, SALT.cloud);
    if (Math.abs(anomaly) > 2.5) cloud *= 0.45;
    const halfRange = dailyAmplitudeC * (0.7 + 0.6 * summerness) * (1.3 - 0.8 * cloud);
    const mean = annualMeanC - annualAmplitudeC * Math.cos(phase) + anomaly;
    const tMin = mean - halfRange;
    // Dew point sits a little under the night's low (common practice for forecasting the low).
    const dewDepression = 0.5 + 2.5 * unit(seed, d, SALT.dewDepression) * (1 - 0.5 * cloud);

    return {
      sunrise,
      sunset,
      solarNoon,
      declination: decl,
      mean,
      tMin,
      tMax: mean + halfRange,
      dewPoint: tMin - dewDepression,
      cloud,
      settled: Math.abs(anomaly) > 2.5,
    };
  }

  private frontEvent(bin: number): FrontEvent | null {
    let event = this.frontEvents.get(bin);
    if (event === undefined) {
      const draw = mulberry32(hash3(this.scenario.seed, bin, SALT.front));
      event =
        draw() < 0.5
          ? {
              start: bin * FRONT_BIN_DAYS + draw() * FRONT_BIN_DAYS,
              plateau: 1 + draw() * 4,
              delta: (draw() < 0.5 ? -1 : 1) * (2.5 + draw() * 4),
            }
          : null;
      this.frontEvents.set(bin, event);
    }
    return event;
  }

  /** Sum of the multi-day spells touching day `d`, °C; cold snaps bite harder in winter, heat in summer. */
  private frontAnomaly(d: number, summerness: number): number {
    const x = d + 0.5;
    const bin = Math.floor(x / FRONT_BIN_DAYS);
    let sum = 0;
    for (let b = bin - 3; b <= bin; b++) {
      const e = this.frontEvent(b);
      if (e === null) continue;
      const rise = smoothstep(x - e.start);
      const fall = 1 - smoothstep((x - e.start - 1 - e.plateau) / 1.5);
      const seasonWeight = e.delta < 0 ? 1.3 - 0.45 * summerness : 0.8 + 0.55 * summerness;
      sum += e.delta * seasonWeight * rise * fall;
    }
    return 9 * Math.tanh(sum / 9);
  }

  /** Sun elevation (deg, refraction-corrected) and azimuth (deg from north, clockwise). */
  sun(t: number, out: { elevation: number; azimuth: number }): void {
    const day = this.day(this.dayIndex(t));
    const H = (2 * Math.PI * (t - day.solarNoon)) / DAY;
    const sinD = Math.sin(day.declination);
    const cosD = Math.cos(day.declination);
    const cosH = Math.cos(H);
    const h = Math.asin(clamp(this.sinPhi * sinD + this.cosPhi * cosD * cosH, -1, 1));
    out.elevation = (h + refraction(h)) / RAD;
    const az = Math.atan2(Math.sin(H), cosH * this.sinPhi - Math.tan(day.declination) * this.cosPhi);
    out.azimuth = (az / RAD + 540) % 360;
  }

  /** Outdoor air temperature without the scripted cold front. */
  baseTemperature(t: number): number {
    const d = this.dayIndex(t);
    const today = this.day(d);
    if (t < today.sunrise) return this.night(this.day(d - 1), today, t);
    if (t <= today.sunset) return this.daytime(today, t);
    return this.night(today, this.day(d + 1), t);
  }

  private daytime(day: DayState, t: number): number {
    const lengthH = (day.sunset - day.sunrise) / HOUR;
    const sinceRiseH = (t - day.sunrise) / HOUR;
    return day.tMin + (day.tMax - day.tMin) * Math.sin((Math.PI * sinceRiseH) / (lengthH + 2 * DAY_PEAK_LAG_H));
  }

  private night(evening: DayState, morning: DayState, t: number): number {
    const atSunset = this.daytime(evening, evening.sunset);
    const x = (t - evening.sunset) / (morning.sunrise - evening.sunset);
    const decay = (Math.exp(-NIGHT_DECAY * x) - Math.exp(-NIGHT_DECAY)) / NIGHT_DECAY_NORM;
    return morning.tMin + (atSunset - morning.tMin) * decay;
  }

  temperature(t: number): number {
    const front = this.scenario.coldFront;
    if (front === undefined) return this.baseTemperature(t);
    const start = front.start.getTime();
    const bottomEnd = start + FRONT_FALL_MS + front.hours * HOUR;
    if (t < start || t >= bottomEnd + FRONT_RECOVERY_MS) return this.baseTemperature(t);
    // The front is pinned to the air it arrives in, so the fall is a straight line whatever the hour.
    this.frontAnchor ??= this.baseTemperature(start);
    const bottom = this.frontAnchor - front.dropC;
    if (t < start + FRONT_FALL_MS) return this.frontAnchor - (front.dropC * (t - start)) / FRONT_FALL_MS;
    if (t < bottomEnd) return bottom;
    const r = (t - bottomEnd) / FRONT_RECOVERY_MS;
    return bottom + (this.baseTemperature(t) - bottom) * r;
  }

  /** The day's dew point, blended between solar noons so the vapour in the air changes smoothly. */
  dewPoint(t: number): number {
    return this.blendDays(t, (day) => day.dewPoint);
  }

  /** The outdoor daily mean, blended between solar noons. */
  dailyMean(t: number): number {
    return this.blendDays(t, (day) => day.mean);
  }

  private blendDays(t: number, value: (day: DayState) => number): number {
    const d = this.dayIndex(t);
    const today = this.day(d);
    const other = t < today.solarNoon ? this.day(d - 1) : this.day(d + 1);
    const w = Math.abs(t - today.solarNoon) / Math.abs(other.solarNoon - today.solarNoon);
    return value(today) + (value(other) - value(today)) * w;
  }

  /** Share of direct sun getting through: sunny spells on part-cloudy days, blended over 15 minutes. */
  directFraction(t: number, cloud: number): number {
    const slot = 15 * MINUTE;
    const i = Math.floor(t / slot);
    const w = (t - i * slot) / slot;
    const a = unit(this.scenario.seed, i, SALT.sunnySpell) >= cloud ? 1 : 0.1;
    const b = unit(this.scenario.seed, i + 1, SALT.sunnySpell) >= cloud ? 1 : 0.1;
    return a + (b - a) * w;
  }

  outdoorHumidity(t: number, temperature: number): number {
    // Air holds its vapour through the day (dew point fixed), so RH climbs as it cools at night;
    // it cannot rise far past saturation, hence the cap just below the air temperature.
    const dew = Math.min(this.dewPoint(t), temperature - 0.2);
    return clamp(relativeHumidity(dew, temperature), 20, 100);
  }
}

/** Outdoor air and sun for a site under a scenario; the same inputs always give the same series. */
export function outdoorClimate(site: SimSite, scenario: Scenario): (t: Date) => OutdoorSample {
  assertSite(site);
  const climate = new Climate(site, scenario);
  const sun = { elevation: 0, azimuth: 0 };
  return (at: Date) => {
    const t = at.getTime();
    const temperature = climate.temperature(t);
    climate.sun(t, sun);
    return { temperature, humidity: climate.outdoorHumidity(t, temperature), sunElevation: sun.elevation };
  };
}

/** What a weather service reports for an hour: air, cloud, wind and sun at the ground. */
export type OutdoorWeather = {
  temperature: number;
  humidity: number;
  /** Total cloud cover, %. */
  cloudCover: number;
  /** Wind at 10 m, km/h. */
  windSpeed: number;
  /** Global horizontal irradiance, W/m² (mean of the hour before, as services report it). */
  shortwave: number;
};

// Daylight's luminous efficacy, ~110 lm/W for sun and sky together (memory).
const LUX_PER_WATT = 110;

/**
 * Hourly outdoor weather as a weather service reports it, from the same climate as `generate`:
 * instant temperature and humidity at `t`, cloud of the day, a wind that drops on settled (clear,
 * frosty or hot) days and at night, and the sun's irradiance averaged over the hour before `t`.
 */
export function outdoorWeather(site: SimSite, scenario: Scenario): (t: Date) => OutdoorWeather {
  assertSite(site);
  const climate = new Climate(site, scenario);
  const sun = { elevation: 0, azimuth: 0 };
  const skyNow: Sky = { directNormal: 0, diffuseHorizontal: 0 };
  return (at: Date) => {
    const t = at.getTime();
    const d = climate.dayIndex(t);
    const day = climate.day(d);
    const temperature = climate.temperature(t);
    let lux = 0;
    for (let k = 0; k < 4; k++) {
      const ts = t - (k + 0.5) * 15 * MINUTE;
      climate.sun(ts, sun);
      sky(sun.elevation, climate.directFraction(ts, climate.day(climate.dayIndex(ts)).cloud), skyNow);
      lux += skyNow.directNormal * Math.max(0, Math.sin(sun.elevation * RAD)) + skyNow.diffuseHorizontal;
    }
    climate.sun(t, sun);
    const seed = scenario.seed;
    const gusty = day.settled ? 0.4 : 1;
    const daytime = sun.elevation > 0 ? 1.3 : 0.8;
    const windSpeed =
      (4 + 16 * unit(seed, d, SALT.wind) * gusty) *
      daytime *
      (0.8 + 0.4 * unit(seed, Math.floor(t / HOUR), SALT.windHour));
    return {
      temperature,
      humidity: climate.outdoorHumidity(t, temperature),
      cloudCover: Math.round(100 * day.cloud),
      windSpeed: Math.round(windSpeed * 10) / 10,
      shortwave: Math.round(lux / 4 / LUX_PER_WATT),
    };
  };
}

/**
 * The scenario the simulator (and the local weather service fake) uses at a place: the demo's at
 * the demo site, elsewhere a climate drawn from the latitude (warmer and flatter towards the
 * equator; rough figures from memory for a maritime-to-continental middle) with its own seed, so
 * every place is deterministic and different.
 */
export function scenarioAt(latitude: number, longitude: number): Scenario {
  if (Math.abs(latitude - DEMO_SITE.latitude) < 0.05 && Math.abs(longitude - DEMO_SITE.longitude) < 0.05)
    return DEMO_SCENARIO;
  const lat = Math.abs(latitude);
  const key = Math.round((latitude + 90) * 100) * 40000 + Math.round((longitude + 180) * 100);
  return {
    seed: hash3(DEMO_SCENARIO.seed, key, 7),
    annualMeanC: clamp(27 - 0.32 * lat, -15, 28),
    annualAmplitudeC: clamp(1 + 0.12 * lat, 1, 18),
    dailyAmplitudeC: 4 + 2 * unit(DEMO_SCENARIO.seed, key, 8),
    coldestDayOfYear: 15,
    fronts: true,
  };
}

// ---------------------------------------------------------------------------------------------
// Light. Illuminance figures are approximations from memory: ~128 klux above the atmosphere,
// ~100 klux in clear midsummer sun at the ground; a window with frame, glass and sill setback
// passes roughly a third of the direct beam.

const EXTRATERRESTRIAL_LUX = 128_000;
const WINDOW_DIRECT_SHARE = 0.35;
const WINDOW_DIFFUSE_SHARE = 0.15;

type Sky = { directNormal: number; diffuseHorizontal: number };

function sky(elevationDeg: number, directFraction: number, out: Sky): void {
  if (elevationDeg <= -6) {
    out.directNormal = 0;
    out.diffuseHorizontal = 0;
    return;
  }
  if (elevationDeg <= 0) {
    const civil = (elevationDeg + 6) / 6;
    out.directNormal = 0;
    out.diffuseHorizontal = 400 * civil * civil;
    return;
  }
  const sinE = Math.sin(elevationDeg * RAD);
  // Kasten & Young (1989) air mass; Meinel's 0.7^(AM^0.678) clear-sky beam transmission.
  const airMass = 1 / (sinE + 0.50572 * Math.pow(elevationDeg + 6.07995, -1.6364));
  out.directNormal = EXTRATERRESTRIAL_LUX * Math.pow(0.7, Math.pow(airMass, 0.678)) * directFraction;
  out.diffuseHorizontal = 400 + 15_000 * Math.pow(sinE, 0.7);
}

/** Direct beam through a vertical window facing `facing`, lux (before the window's share). */
function beamOnWall(facing: Facing, elevationDeg: number, azimuthDeg: number, directNormal: number): number {
  if (facing === "none" || directNormal === 0) return 0;
  const cosIncidence = Math.cos(elevationDeg * RAD) * Math.cos((azimuthDeg - FACING_AZIMUTH[facing]) * RAD);
  return cosIncidence > 0 ? directNormal * cosIncidence : 0;
}

// ---------------------------------------------------------------------------------------------
// Indoor spots

type Setpoints = { day: number; night: number };
// Day 07:00–22:00 local time, night otherwise (common practice for a programmable thermostat).
const HEAT_DAY_START_H = 7;
const HEAT_DAY_HOURS = 15;
const HEATING_SEASON_BELOW_C = 15;

const SETPOINTS: Record<Exclude<SpotKind, "outdoor">, Setpoints> = {
  "heated-room": { day: 20, night: 17 },
  // The living space a windowsill belongs to.
  windowsill: { day: 20, night: 17 },
  // A room with its radiator kept low: spare room, landing, cool conservatory corner.
  room: { day: 18, night: 15 },
  // A towel rail on the same programme.
  bathroom: { day: 19, night: 16 },
};

// Moisture added indoors over the outdoor vapour pressure, hPa: people, cooking, plants,
// less ventilation in winter. Rough figures from memory for occupied homes (cf. BS 5250 moisture
// excess); the heated room is kept low so it dries to 30–40 % RH as growers report (common practice).
const MOISTURE_EXCESS_HPA: Record<Exclude<SpotKind, "outdoor">, { heating: number; free: number }> = {
  "heated-room": { heating: 1.5, free: 2.5 },
  windowsill: { heating: 2.0, free: 2.5 },
  room: { heating: 3.5, free: 2.5 },
  bathroom: { heating: 4.5, free: 3.5 },
};

/** Free-running warmth of the building over the outdoor mean from people, appliances and sun, °C. */
const INTERNAL_GAIN_C = 4.5;

type LocalClock = (t: number) => number;

/** Local wall-clock time (as naive ms) of an instant, from the one time-zone module. */
function localClock(timeZone: string): LocalClock {
  const clock = zoneClock(timeZone);
  return (t) => t + clock.offsetAt(t);
}

type Shower = { start: number; end: number; peak: number };

class SpotModel {
  private readonly clock: LocalClock;
  private readonly sun = { elevation: 0, azimuth: 0 };
  private readonly sky: Sky = { directNormal: 0, diffuseHorizontal: 0 };
  private readonly heatingSeason = new Map<number, boolean>();
  private readonly showers = new Map<number, Shower[]>();
  temperature = 0;
  humidity = 0;
  lux = 0;

  constructor(
    private readonly climate: Climate,
    private readonly spot: SimSpot,
  ) {
    this.clock = localClock(climate.site.timeZone);
  }

  /** Fills `temperature`, `humidity` and `lux` with the true (noise-free) values at `t`. */
  evaluate(t: number): void {
    const climate = this.climate;
    const day = climate.day(climate.dayIndex(t));
    climate.sun(t, this.sun);
    sky(this.sun.elevation, climate.directFraction(t, day.cloud), this.sky);
    const outdoor = climate.temperature(t);
    const local = this.clock(t);
    const { kind, facing } = this.spot;
    const beam = beamOnWall(facing, this.sun.elevation, this.sun.azimuth, this.sky.directNormal);
    const windowBeam = beam * WINDOW_DIRECT_SHARE;
    const windowDiffuse = this.sky.diffuseHorizontal * WINDOW_DIFFUSE_SHARE;

    if (kind === "outdoor") {
      this.temperature = outdoor;
      this.humidity = climate.outdoorHumidity(t, outdoor);
      if (facing === "none") {
        this.lux = this.sky.directNormal * Math.max(0, Math.sin(this.sun.elevation * RAD)) + this.sky.diffuseHorizontal;
      } else {
        // Against a wall: the beam only from the open side, and half the sky.
        const fromFront = beam > 0 ? this.sky.directNormal * Math.max(0, Math.sin(this.sun.elevation * RAD)) : 0;
        this.lux = fromFront + 0.6 * this.sky.diffuseHorizontal;
      }
      return;
    }

    const heatingDay = Math.floor((local - HEAT_DAY_START_H * HOUR) / DAY);
    const heating = this.isHeatingSeason(heatingDay);
    const sinceHeatDayStart = local - (heatingDay * DAY + HEAT_DAY_START_H * HOUR);
    const roomSunGain = 1.5 * Math.min(1, windowBeam / 18_000);
    const free = this.freeRunning(t) + roomSunGain;
    // Moisture excess shifts between its heating and free-running values over a morning, not at once.
    const excess = MOISTURE_EXCESS_HPA[kind];
    const heatedBefore = this.isHeatingSeason(heatingDay - 1) ? 1 : 0;
    const heatedShare = heatedBefore + ((heating ? 1 : 0) - heatedBefore) * smoothstep(sinceHeatDayStart / (6 * HOUR));
    const vapour =
      saturationVapourPressureHpa(climate.dewPoint(t)) + excess.free + (excess.heating - excess.free) * heatedShare;
    const lamp = this.lampLux(local);

    if (kind === "windowsill") {
      const interior = this.heated(SETPOINTS.windowsill, free, heating, heatingDay, sinceHeatDayStart);
      // Near the glass the sill sits a fraction of the way to the outdoor air — more at night with
      // the curtain drawn and the room's warmth shut out; in sun the sensor itself warms.
      const night = 1 - smoothstep((this.sun.elevation + 5) / 10);
      const glassShare = 0.15 + 0.15 * night;
      this.temperature = interior - glassShare * (interior - outdoor) + 5 * Math.min(1.5, windowBeam / 18_000);
      this.humidity = clamp((100 * vapour) / saturationVapourPressureHpa(this.temperature), 20, 100);
      this.lux = windowBeam + windowDiffuse + 0.2 * lamp;
      return;
    }

    let temperature = this.heated(SETPOINTS[kind], free, heating, heatingDay, sinceHeatDayStart);
    let steam = { level: 0, peak: 0 };
    if (kind === "bathroom") {
      steam = this.shower(local);
      temperature += 1.5 * steam.level;
    }
    this.temperature = temperature;
    const rh = (100 * vapour) / saturationVapourPressureHpa(temperature);
    this.humidity = clamp(rh + Math.max(0, steam.peak - rh) * steam.level, 20, 100);
    const showerLight = steam.level > 0.5 ? 300 : 0;
    // Away from the glass a room gets a share of the window's light, plus its lamps in the evening.
    const fromWindow = facing === "none" ? 0.05 * windowDiffuse : 0.12 * windowBeam + 0.25 * windowDiffuse;
    this.lux = fromWindow + Math.max(lamp, showerLight);
  }

  /** Building temperature with no heating: a lagged, damped echo of the outdoor days. */
  private freeRunning(t: number): number {
    const c = this.climate;
    const mean = 0.5 * c.dailyMean(t) + 0.3 * c.dailyMean(t - DAY) + 0.2 * c.dailyMean(t - 2 * DAY);
    const earlier = t - 3 * HOUR;
    const swing = c.baseTemperature(earlier) - c.dailyMean(earlier);
    return mean + INTERNAL_GAIN_C + 0.2 * swing;
  }

  /** Heating runs while the last three days averaged under 15 °C outdoors (common practice). */
  private isHeatingSeason(heatingDay: number): boolean {
    let on = this.heatingSeason.get(heatingDay);
    if (on === undefined) {
      const c = this.climate;
      const mean = (c.day(heatingDay - 1).mean + c.day(heatingDay - 2).mean + c.day(heatingDay - 3).mean) / 3;
      on = mean < HEATING_SEASON_BELOW_C;
      this.heatingSeason.set(heatingDay, on);
    }
    return on;
  }

  private heated(set: Setpoints, free: number, heating: boolean, heatingDay: number, since: number): number {
    if (!heating) {
      // Heating just went off for the season: the night's warmth drains away over the morning.
      if (this.isHeatingSeason(heatingDay - 1) && set.night > free) {
        return free + (set.night - free) * Math.exp(-since / (3 * HOUR));
      }
      return free;
    }
    let held: number;
    if (since < HEAT_DAY_HOURS * HOUR) {
      const before = this.isHeatingSeason(heatingDay - 1) ? set.night : Math.min(free, set.day);
      held = set.day - (set.day - before) * Math.exp(-since / (0.75 * HOUR));
    } else {
      held = set.night + (set.day - set.night) * Math.exp(-(since - HEAT_DAY_HOURS * HOUR) / (2 * HOUR));
    }
    if (free >= held) return free;
    // Thermostat cycling shows as a small ripple while the heater is doing the work.
    const ripple = 0.25 * Math.sin((2 * Math.PI * since) / (40 * MINUTE)) * clamp(held - free, 0, 1);
    return held + ripple;
  }

  private lampLux(local: number): number {
    if (!this.spot.hasLight || this.sun.elevation > 3) return 0;
    const localDay = Math.floor(local / DAY);
    const hour = (local - localDay * DAY) / HOUR;
    if (hour < 18 || hour >= 23) return 0;
    const seed = this.climate.scenario.seed;
    if (unit(seed, localDay, SALT.lamp) > 0.85) return 0;
    return 150 + 150 * unit(seed, localDay, SALT.lampLevel);
  }

  private showersOf(localDay: number): Shower[] {
    let list = this.showers.get(localDay);
    if (list === undefined) {
      const seed = this.climate.scenario.seed;
      const base = localDay * DAY;
      list = [];
      const morning = mulberry32(hash3(seed, localDay, SALT.showerMorning));
      if (morning() < 0.9) {
        const start = base + 6.5 * HOUR + morning() * 90 * MINUTE;
        list.push({ start, end: start + (8 + morning() * 7) * MINUTE, peak: 87 + morning() * 9 });
      }
      const evening = mulberry32(hash3(seed, localDay, SALT.showerEvening));
      if (evening() < 0.45) {
        const start = base + 19.5 * HOUR + evening() * 150 * MINUTE;
        list.push({ start, end: start + (8 + evening() * 7) * MINUTE, peak: 87 + evening() * 9 });
      }
      this.showers.set(localDay, list);
    }
    return list;
  }

  /** How far the room is towards a shower's steam (0 … 1), and that shower's peak RH. */
  private shower(local: number): { level: number; peak: number } {
    const localDay = Math.floor(local / DAY);
    let level = 0;
    let peak = 0;
    for (const d of [localDay - 1, localDay]) {
      for (const s of this.showersOf(d)) {
        if (local < s.start) continue;
        const atEnd = 1 - Math.exp(-(s.end - s.start) / (2 * MINUTE));
        const l =
          local < s.end
            ? 1 - Math.exp(-(local - s.start) / (2 * MINUTE))
            : atEnd * Math.exp(-(local - s.end) / (30 * MINUTE));
        if (l > level) {
          level = l;
          peak = s.peak;
        }
      }
    }
    return { level, peak };
  }
}

// ---------------------------------------------------------------------------------------------
// Sensor

const DROPOUT_PER_HOUR = 1 / 200;
const DUPLICATE_SHARE = 0.003;
const SWAP_SHARE = 0.003;

/** Drop-outs start in some hours and last 10 min – 3 h, mostly short. */
function isDroppedOut(sensorSeed: number, t: number): boolean {
  const hour = Math.floor(t / HOUR);
  for (let h = hour - 3; h <= hour; h++) {
    const draw = mulberry32(hash3(sensorSeed, h, SALT.dropout));
    if (draw() >= DROPOUT_PER_HOUR) continue;
    const start = h * HOUR + draw() * HOUR;
    const length = (10 + 170 * draw() ** 2) * MINUTE;
    if (t >= start && t < start + length) return true;
  }
  return false;
}

/** Coin cell: near full for months, then a faster slide; about 15 % left after a year. */
function batteryPercent(sensorSeed: number, ageMs: number): number {
  if (ageMs <= 0) return 100;
  const lifeDays = 365 * (0.9 + 0.2 * unit(sensorSeed, 0, SALT.batteryLife));
  const worn = ageMs / DAY / lifeDays;
  return Math.max(0, Math.round(100 - 85 * worn ** 1.6));
}

function assertSite(site: SimSite): void {
  if (!(Math.abs(site.latitude) <= 90) || !(Math.abs(site.longitude) <= 180)) {
    throw new RangeError(`site position out of range: ${site.latitude}, ${site.longitude}`);
  }
}

/**
 * Readings of one sensor in one spot. Sample instants are the multiples of `intervalMs` since the
 * Unix epoch with from ≤ t < to, so overlapping runs line up. Noise, drop-outs and artifacts are
 * keyed by `sensorSeed` and the instant; the climate by `scenario.seed`.
 */
export function* generate(
  site: SimSite,
  spot: SimSpot,
  scenario: Scenario,
  opts: GenerateOptions,
): Generator<SimReading> {
  assertSite(site);
  const { intervalMs, sensorSeed } = opts;
  if (!(intervalMs >= 1000)) throw new RangeError(`intervalMs must be at least 1000, got ${intervalMs}`);
  const from = opts.from.getTime();
  const to = opts.to.getTime();
  const installed = (opts.installedAt ?? opts.from).getTime();
  const model = new SpotModel(new Climate(site, scenario), spot);
  let held: SimReading | undefined;

  for (let t = Math.ceil(from / intervalMs) * intervalMs; t < to; t += intervalMs) {
    if (isDroppedOut(sensorSeed, t)) continue;
    model.evaluate(t);
    const second = Math.floor(t / 1000);
    const reading: SimReading = {
      measuredAt: new Date(t),
      temperature: round1(model.temperature + 0.2 * triangular(sensorSeed, second, SALT.noiseT)),
      humidity: round1(clamp(model.humidity + 1.5 * triangular(sensorSeed, second, SALT.noiseRh), 0, 100)),
      battery: batteryPercent(sensorSeed, t - installed),
    };
    if (spot.hasLight) {
      reading.lux = Math.max(0, Math.round(model.lux * (1 + 0.03 * triangular(sensorSeed, second, SALT.noiseLux))));
    }

    if (!opts.artifacts) {
      yield reading;
      continue;
    }
    if (held !== undefined) {
      yield reading;
      yield held;
      held = undefined;
      continue;
    }
    if (unit(sensorSeed, second, SALT.swap) < SWAP_SHARE) {
      held = reading;
      continue;
    }
    yield reading;
    if (unit(sensorSeed, second, SALT.duplicate) < DUPLICATE_SHARE) {
      yield { ...reading, measuredAt: new Date(t) };
    }
  }
  if (held !== undefined) yield held;
}

// ---------------------------------------------------------------------------------------------
// Demo site and scenarios

/** An invented garden in a mild, damp, temperate place (west of England-like latitude and winters). */
export const DEMO_SITE: SimSite = { latitude: 51.7, longitude: -2.2, timeZone: "Europe/London" };

/**
 * Outdoor climate of the demo site: January nights average ~1–2 °C with the coldest near −4 to −6 °C,
 * July days average ~22 °C with hot spells to 28–31 °C — in line with Met Office 1991–2020 averages
 * for lowland Gloucestershire (values from memory). `DEMO_OUTDOOR_MONTHS` lists what it produces.
 */
export const DEMO_SCENARIO: Scenario = {
  seed: 20250101,
  annualMeanC: 10.8,
  annualAmplitudeC: 6.5,
  dailyAmplitudeC: 4,
  coldestDayOfYear: 15,
  fronts: true,
};

/**
 * A flat 12 °C climate with one scripted front: from `start` the air falls in a straight line to
 * ~3 °C over 3 h, stays there 2 h and climbs back over 3 h — below 6 °C for about 4 h in all.
 */
export function coldFrontScenario(start: Date): Scenario {
  return {
    seed: DEMO_SCENARIO.seed,
    annualMeanC: 12,
    annualAmplitudeC: 0,
    dailyAmplitudeC: 0.5,
    coldestDayOfYear: 15,
    fronts: false,
    coldFront: { start, dropC: 9, hours: 2 },
  };
}

/**
 * The forecast front of `start:cold-front` at real-time pace, for the weather fake's forecast and
 * the live sensors alike: the next 18:00 UTC at least 18 h away, the air falling 8 °C over 3 h and
 * held 8 h (a night's frost on the demo bench), so a forecast warning has 12–48 h to be sent.
 */
export function forecastColdFront(now: number): ColdFront {
  let start = Math.floor(now / DAY) * DAY + 18 * HOUR;
  while (start < now + 18 * HOUR) start += DAY;
  return { start: new Date(start), dropC: 8, hours: 8 };
}

/** Suggested spots for a demo household; the sensor seeds keep each sensor's noise its own. */
export const DEMO_SPOTS: ReadonlyArray<SimSpot & { name: string; sensorSeed: number }> = [
  { name: "Bench under the pear tree", kind: "outdoor", facing: "none", hasLight: true, sensorSeed: 101 },
  { name: "Kitchen sill, east", kind: "windowsill", facing: "E", hasLight: true, sensorSeed: 102 },
  { name: "Bathroom shelf", kind: "bathroom", facing: "N", hasLight: false, sensorSeed: 103 },
  { name: "Study bookcase", kind: "heated-room", facing: "S", hasLight: true, sensorSeed: 104 },
  { name: "Landing by the north window", kind: "room", facing: "N", hasLight: true, sensorSeed: 105 },
];

export type MonthExtremes = {
  month: number;
  lowest: number;
  highest: number;
  meanDailyLow: number;
  meanDailyHigh: number;
};

/** Noise-free outdoor extremes per local calendar month of `year`, sampled every 10 minutes. */
export function outdoorMonthExtremes(site: SimSite, scenario: Scenario, year: number): MonthExtremes[] {
  const climate = outdoorClimate(site, scenario);
  const clock = localClock(site.timeZone);
  const days = new Map<number, { month: number; low: number; high: number }>();
  for (let t = Date.UTC(year, 0, 1) - DAY; t < Date.UTC(year + 1, 0, 1) + DAY; t += 10 * MINUTE) {
    const local = new Date(clock(t));
    if (local.getUTCFullYear() !== year) continue;
    const key = Math.floor(local.getTime() / DAY);
    const { temperature } = climate(new Date(t));
    const day = days.get(key);
    if (day === undefined) days.set(key, { month: local.getUTCMonth() + 1, low: temperature, high: temperature });
    else {
      day.low = Math.min(day.low, temperature);
      day.high = Math.max(day.high, temperature);
    }
  }
  const months: MonthExtremes[] = [];
  for (let month = 1; month <= 12; month++) {
    const inMonth = [...days.values()].filter((d) => d.month === month);
    months.push({
      month,
      lowest: Math.min(...inMonth.map((d) => d.low)),
      highest: Math.max(...inMonth.map((d) => d.high)),
      meanDailyLow: inMonth.reduce((s, d) => s + d.low, 0) / inMonth.length,
      meanDailyHigh: inMonth.reduce((s, d) => s + d.high, 0) / inMonth.length,
    });
  }
  return months;
}

export type MonthRange = { month: number; lowest: [number, number]; highest: [number, number] };

/**
 * What `DEMO_SCENARIO` produces outdoors at `DEMO_SITE`, per local month: the range in which the
 * month's lowest and highest fall in every year 2022–2030 (computed from `outdoorMonthExtremes`,
 * widened by about 0.5 °C). A season profile built from the demo's outdoor spot belongs inside.
 */
export const DEMO_OUTDOOR_MONTHS: ReadonlyArray<MonthRange> = [
  { month: 1, lowest: [-6, 0.5], highest: [8, 13.5] },
  { month: 2, lowest: [-6, 2], highest: [10, 15.5] },
  { month: 3, lowest: [-4, 4], highest: [12.5, 21] },
  { month: 4, lowest: [-1.5, 5], highest: [16.5, 24] },
  { month: 5, lowest: [1, 7.5], highest: [19.5, 28] },
  { month: 6, lowest: [4.5, 10.5], highest: [24, 29.5] },
  { month: 7, lowest: [5, 10], highest: [23, 31.5] },
  { month: 8, lowest: [3.5, 10], highest: [23.5, 30] },
  { month: 9, lowest: [1, 8], highest: [20.5, 27.5] },
  { month: 10, lowest: [-1.5, 4.5], highest: [17, 23.5] },
  { month: 11, lowest: [-5, 2.5], highest: [13, 18.5] },
  { month: 12, lowest: [-6, -3], highest: [9.5, 16.5] },
];
