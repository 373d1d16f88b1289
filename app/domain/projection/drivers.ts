// The outdoor weather turned into the response model's inputs, hour by hour: the air now and
// smoothed over 3, 12 and 48 hours, the sun (through the spot's window when it faces a known way),
// local hour and day, the daily mean, outdoor vapour pressure, cloud and wind. Pure: no I/O.
import { FACING_AZIMUTH } from "~/domain/climate/sun";
import type { SpotFacing } from "~/domain/vocabulary";
import { saturationVapourPressure } from "~/domain/climate/psychro";
import { zoneClock } from "~/domain/season/local-time";

export const HOUR_MS = 3_600_000;
export const DAY_MS = 86_400_000;

/** Hourly outdoor weather from `start` (UTC ms, a whole hour); NaN where unknown. */
export type OutdoorSeries = {
  start: number;
  temperature: ArrayLike<number>;
  humidity: ArrayLike<number>;
  /** Cloud cover, %, and wind at 10 m, km/h: for radiative frost in forecasts. */
  cloud?: ArrayLike<number>;
  wind?: ArrayLike<number>;
  shortwave: ArrayLike<number>;
};

// Time constants of the smoothed outdoor temperatures, hours.
const TAUS = [3, 12, 48];

/** Per-hour inputs derived once from an outdoor series: smoothing runs over the whole series. */
export type Drivers = {
  start: number;
  n: number;
  now: Float64Array;
  smooth: Float64Array[];
  sun: Float64Array;
  hourOfDay: Uint8Array;
  /** Local day number (days since 1970-01-01 in the site's zone) of each hour. */
  localDay: Int32Array;
  /** Sun through the spot's window (direct beam on a vertical pane facing its way), or the sun squared without one. */
  windowSun: Float64Array;
  /** Whether the spot has a window facing a known way: its sun then comes through `windowSun`. */
  hasWindow: boolean;
  dailyMean: Float64Array;
  outdoorVapour: Float64Array;
  /** Cloud cover (%) and wind (km/h) of the hour, NaN where not reported. */
  cloud: Float64Array;
  wind: Float64Array;
};

/** Where the spot is and which way its window faces, for the sun on the glass. */
export type Place = { latitude: number; longitude: number; facing: SpotFacing };

const RAD = Math.PI / 180;

/**
 * Derives the model's inputs from outdoor weather; gaps carry the last known value. With a window
 * facing, the sun's beam on that pane is worked out from the sun's position (suncalc) and the
 * reported irradiance: the global sun divided by the sine of the elevation is the beam, times the
 * cosine of its angle to the pane (capped low in the sky, where the estimate runs away).
 */
export function drivers(w: OutdoorSeries, timeZone: string, place?: Place): Drivers {
  const n = w.temperature.length;
  const now = new Float64Array(n);
  const sun = new Float64Array(n);
  const hourOfDay = new Uint8Array(n);
  const localDay = new Int32Array(n);
  const outdoorVapour = new Float64Array(n);
  const cloud = new Float64Array(n);
  const wind = new Float64Array(n);
  const smooth = TAUS.map(() => new Float64Array(n));
  const dailyMean = new Float64Array(n);
  const windowSun = new Float64Array(n);
  const facingAz = place && place.facing !== "none" ? FACING_AZIMUTH[place.facing] * RAD : null;
  const pos = { altitude: 0, azimuth: 0 };
  const sunAt = facingAz !== null ? new SunPosition(place!.latitude, place!.longitude) : null;
  const clock = zoneClock(timeZone);
  let lastT = NaN;
  let lastSw = 0;
  let lastRh = 80;
  for (let i = 0; i < n; i++)
    if (Number.isFinite(w.temperature[i])) {
      lastT = w.temperature[i];
      break;
    }
  if (!Number.isFinite(lastT)) lastT = 10;
  const alpha = TAUS.map((tau) => 1 - Math.exp(-1 / tau));
  const s = TAUS.map(() => lastT);
  let offset = clock.offsetAt(w.start);
  let offsetDay = Math.floor(w.start / DAY_MS);
  for (let i = 0; i < n; i++) {
    const t = w.start + i * HOUR_MS;
    const a = w.temperature[i];
    const b = i + 1 < n ? w.temperature[i + 1] : a;
    if (Number.isFinite(a)) lastT = a;
    // The rollup of hour i is the mean over [i, i+1); the service reports instants at the hour.
    now[i] = Number.isFinite(a) && Number.isFinite(b) ? (a + b) / 2 : lastT;
    for (let k = 0; k < TAUS.length; k++) {
      s[k] += alpha[k] * (now[i] - s[k]);
      smooth[k][i] = s[k];
    }
    // Irradiance is the mean of the hour before its time stamp: hour i's sun is reported at i+1.
    const sw = i + 1 < n ? w.shortwave[i + 1] : w.shortwave[i];
    if (Number.isFinite(sw)) lastSw = sw;
    sun[i] = lastSw / 100;
    if (facingAz !== null && lastSw > 0) {
      sunAt!.at(t + HOUR_MS / 2, pos);
      const cosInc = Math.cos(pos.altitude) * Math.cos(pos.azimuth - facingAz);
      const sinE = Math.sin(pos.altitude);
      const beam = pos.altitude > 0 && cosInc > 0 ? Math.min(8, (sun[i] * cosInc) / Math.max(0.15, sinE)) : 0;
      windowSun[i] = 3 * (1 - Math.exp(-beam / 3));
    } else windowSun[i] = facingAz === null ? sun[i] * sun[i] : 0;
    const rh = w.humidity[i];
    if (Number.isFinite(rh)) lastRh = rh;
    cloud[i] = w.cloud ? w.cloud[i] : NaN;
    wind[i] = w.wind ? w.wind[i] : NaN;
    outdoorVapour[i] = (saturationVapourPressure(now[i]) * lastRh) / 100;
    const day = Math.floor(t / DAY_MS);
    if (day !== offsetDay) {
      offsetDay = day;
      offset = clock.offsetAt(t + 12 * HOUR_MS);
    }
    hourOfDay[i] = Math.floor(((((t + offset) % DAY_MS) + DAY_MS) % DAY_MS) / HOUR_MS);
    localDay[i] = Math.floor((t + offset) / DAY_MS);
  }
  // Centred 24-hour mean, for telling which outdoor conditions the fit has seen.
  let acc = 0;
  for (let i = 0; i < Math.min(24, n); i++) acc += now[i];
  for (let i = 0; i < n; i++) {
    const lo = i - 12;
    const hi = i + 12;
    if (lo >= 0 && hi < n) acc += now[hi] - now[lo];
    dailyMean[i] = lo >= 0 && hi < n ? acc / 24 : now[i];
  }
  return {
    start: w.start,
    n,
    now,
    smooth,
    sun,
    hourOfDay,
    localDay,
    windowSun,
    hasWindow: facingAz !== null,
    dailyMean,
    outdoorVapour,
    cloud,
    wind,
  };
}

/**
 * The sun's altitude and compass azimuth (radians, from north, clockwise) — the low-precision
 * formulas of the Astronomical Almanac (about 0.01°). The sun's right ascension and declination are
 * worked out once per UTC day (they move about 1° a day: under 2 minutes of hour angle), which
 * keeps ten years of hours cheap.
 */
class SunPosition {
  private day = NaN;
  private ra = 0;
  private sinDec = 0;
  private cosDec = 0;
  private readonly sinPhi: number;
  private readonly cosPhi: number;
  constructor(
    latitude: number,
    private readonly longitude: number,
  ) {
    this.sinPhi = Math.sin(latitude * RAD);
    this.cosPhi = Math.cos(latitude * RAD);
  }

  at(ms: number, out: { altitude: number; azimuth: number }): void {
    const n = (ms - J2000) / DAY_MS;
    const day = Math.floor(n);
    if (day !== this.day) {
      this.day = day;
      const m = day + 0.5;
      const g = (357.529 + 0.98560028 * m) * RAD;
      const L = (280.459 + 0.98564736 * m + 1.915 * Math.sin(g) + 0.02 * Math.sin(2 * g)) * RAD;
      const e = (23.439 - 0.00000036 * m) * RAD;
      this.ra = Math.atan2(Math.cos(e) * Math.sin(L), Math.cos(L));
      const dec = Math.asin(Math.sin(e) * Math.sin(L));
      this.sinDec = Math.sin(dec);
      this.cosDec = Math.cos(dec);
    }
    const H = (18.697374558 + 24.06570982441908 * n) * 15 * RAD + this.longitude * RAD - this.ra;
    const cosH = Math.cos(H);
    out.altitude = Math.asin(this.sinPhi * this.sinDec + this.cosPhi * this.cosDec * cosH);
    out.azimuth = Math.atan2(-Math.sin(H), (this.sinDec / this.cosDec) * this.cosPhi - this.sinPhi * cosH);
  }
}
const J2000 = Date.UTC(2000, 0, 1, 12);
