// Where the sun is, for matching a spot's light to a plant before a light sensor has a season of
// data. Positions come from suncalc 2.x (degrees, refraction-corrected altitude, azimuth clockwise
// from north).
import * as SunCalc from "suncalc";
import { median } from "simple-statistics";
import { MONTH_NAMES } from "~/lib/date-words";
import { FACING_WORDS, type SpotFacing, type WindowFacing } from "~/domain/vocabulary";

const DEG = Math.PI / 180;

export interface SunTimes {
  sunrise: Date | null;
  sunset: Date | null;
  /** Set when the sun stays up ("day") or down ("night") all of that day; then both times are null. */
  polar: "day" | "night" | null;
}

function validDate(d: Date | null | undefined): Date | null {
  return d instanceof Date && Number.isFinite(d.getTime()) ? d : null;
}

/** Sunrise and sunset of the solar day suncalc anchors to `date`'s UTC calendar day, at the site. */
export function sunTimes(lat: number, lon: number, date: Date): SunTimes {
  const t = SunCalc.getTimes(date, lat, lon);
  const sunrise = validDate(t.sunrise);
  const sunset = validDate(t.sunset);
  let polar: SunTimes["polar"] = null;
  if (sunrise === null || sunset === null) {
    polar = t.alwaysUp ? "day" : t.alwaysDown ? "night" : null;
  }
  return { sunrise, sunset, polar };
}

/**
 * The sun's elevation at solar noon, degrees, as suncalc gives it (its Meeus positions, altitude
 * corrected for refraction), on the Greenwich meridian on the date's UTC day: the site's own noon
 * is at most half a day away, worth under 0.2° of declination even at an equinox. Negative in
 * polar night.
 */
export function noonElevation(lat: number, date: Date): number {
  const midday = new Date(Date.UTC(date.getUTCFullYear(), date.getUTCMonth(), date.getUTCDate(), 12));
  return SunCalc.getPosition(SunCalc.getTimes(midday, lat, 0).solarNoon, lat, 0).altitude;
}

export interface MonthNoonElevation {
  /** 1 = January */
  month: number;
  date: Date;
  elevation: number;
}

// The 21st of each month: it lands on or next to both solstices and both equinoxes, so the
// extremes of the year show up in the table.
const SAMPLE_DAY = 21;
const DEFAULT_YEAR = 2025;

function sampleDates(year: number): Date[] {
  return Array.from({ length: 12 }, (_, m) => new Date(Date.UTC(year, m, SAMPLE_DAY, 12)));
}

/** Noon elevation on the 21st of each month (declination barely changes from year to year). */
export function noonElevationByMonth(lat: number, year: number = DEFAULT_YEAR): MonthNoonElevation[] {
  return sampleDates(year).map((date, m) => ({ month: m + 1, date, elevation: noonElevation(lat, date) }));
}

/** Azimuth of the outward normal of a window, degrees clockwise from north. */
export const FACING_AZIMUTH: Readonly<Record<WindowFacing, number>> = {
  N: 0,
  NE: 45,
  E: 90,
  SE: 135,
  S: 180,
  SW: 225,
  W: 270,
  NW: 315,
};

/** Sun lower than this is taken to be lost behind the horizon clutter of any real home. */
export const DIRECT_SUN_MIN_ALTITUDE = 5;
/**
 * Beyond this angle of incidence on the glass, ordinary glazing reflects a fast-growing share of
 * the beam (Fresnel reflection) and the window frame shades more: the sun is "there" but weak.
 */
export const FACE_ON_MAX_INCIDENCE = 60;
const SAMPLE_MINUTES = 15;

export interface DirectSunMonth {
  /** 1 = January; computed for the 21st. */
  month: number;
  noonElevation: number;
  /** Hours the sun stands in front of the glass (within 90° of its normal) and above 5°. */
  hours: number;
  /** Of those, before and after solar noon. */
  morningHours: number;
  afternoonHours: number;
  /** Hours the sun strikes the glass within 60° of square-on, where it comes in strongly. */
  faceOnHours: number;
  /**
   * Typical (median over the sunny quarter-hours) horizontal distance the sun patch reaches into
   * the room, measured straight in from the glass, per metre of window height above the sill or
   * shelf: cos(azimuth off the normal) / tan(altitude). null when there is no direct sun.
   */
  depthPerMetre: number | null;
  /** At least half an hour of direct sun. */
  getsDirectSun: boolean;
}

export interface DirectSunEstimate {
  facing: SpotFacing;
  latitude: number;
  /** null when the spot is not behind a window. */
  months: DirectSunMonth[] | null;
  explanation: string;
}

function offNormal(sunAzimuth: number, normal: number): number {
  return ((((sunAzimuth - normal) % 360) + 540) % 360) - 180;
}

function directSunOnThe21st(lat: number, normal: number, year: number, monthIndex: number): DirectSunMonth {
  // Longitude does not change the daily pattern, so the site is put on the Greenwich meridian,
  // where a UTC day is a solar day (give or take the equation of time).
  const dayStart = Date.UTC(year, monthIndex, SAMPLE_DAY);
  const solarNoon = SunCalc.getTimes(new Date(dayStart + 12 * 3_600_000), lat, 0).solarNoon.getTime();
  const step = SAMPLE_MINUTES * 60_000;
  const stepHours = SAMPLE_MINUTES / 60;
  let hours = 0;
  let morningHours = 0;
  let faceOnHours = 0;
  const depths: number[] = [];
  const faceOnCos = Math.cos(FACE_ON_MAX_INCIDENCE * DEG);
  // Midpoint of each quarter-hour, so the count does not lean towards either end of the day.
  for (let t = dayStart + step / 2; t < dayStart + 86_400_000; t += step) {
    const { azimuth, altitude } = SunCalc.getPosition(new Date(t), lat, 0);
    const off = offNormal(azimuth, normal);
    if (altitude <= DIRECT_SUN_MIN_ALTITUDE || Math.abs(off) >= 90) continue;
    hours += stepHours;
    if (t < solarNoon) morningHours += stepHours;
    const cosOff = Math.cos(off * DEG);
    if (Math.cos(altitude * DEG) * cosOff > faceOnCos) faceOnHours += stepHours;
    depths.push(cosOff / Math.tan(altitude * DEG));
  }
  return {
    month: monthIndex + 1,
    noonElevation: noonElevation(lat, new Date(dayStart)),
    hours,
    morningHours,
    afternoonHours: hours - morningHours,
    faceOnHours,
    depthPerMetre: depths.length > 0 ? median(depths) : null,
    getsDirectSun: hours >= 0.5,
  };
}

function formatLatitude(lat: number): string {
  return `${Number(Math.abs(lat).toFixed(1))}° ${lat >= 0 ? "N" : "S"}`;
}

const TROPIC_LATITUDE = 23.44;

function roundHalf(h: number): string {
  return `${Math.round(h * 2) / 2} h`;
}

function facingSentence(lat: number, facing: WindowFacing): string {
  if (facing === "E") return "An east window gets sun from sunrise until late morning, all year round.";
  if (facing === "W") return "A west window gets sun from early afternoon until sunset, all year round.";
  if (Math.abs(lat) < TROPIC_LATITUDE) {
    return (
      `At ${formatLatitude(lat)}, inside the tropics, the midday sun stands high all year and passes ` +
      `north of overhead for part of the year and south of it for the rest, so north- and ` +
      `south-facing windows each get their turn of direct sun.`
    );
  }
  const equatorSide = lat >= 0 ? "S" : "N";
  const poleSide = lat >= 0 ? "N" : "S";
  if (facing === equatorSide) {
    return (
      `A ${FACING_WORDS[facing]} window faces the side of the sky the sun crosses at midday, so it ` +
      `gets low winter sun that reaches deep into the room and a high summer sun that strikes the ` +
      `glass steeply and barely comes in.`
    );
  }
  if (facing === poleSide) {
    return (
      `A ${FACING_WORDS[facing]} window faces away from the midday sun: it gets no direct sun through ` +
      `the colder half of the year, and around midsummer only early-morning and late-evening sun, ` +
      `low and slanting.`
    );
  }
  const part = facing.endsWith("E") ? "morning" : "afternoon";
  if (facing.startsWith(equatorSide)) {
    return (
      `A ${FACING_WORDS[facing]} window gets ${part} sun all year, lower and reaching deeper into ` +
      `the room in winter.`
    );
  }
  return (
    `A ${FACING_WORDS[facing]} window gets early ${part === "morning" ? "morning" : "evening"} sun ` +
    `mainly in the warmer half of the year, and little or none in winter.`
  );
}

function describeDay(m: DirectSunMonth): string {
  const day = `on 21 ${MONTH_NAMES[m.month - 1]}`;
  if (!m.getsDirectSun || m.depthPerMetre === null) return `${day}, no direct sun to speak of`;
  const glancing = m.faceOnHours < m.hours / 2 ? ", mostly at a glancing angle" : "";
  return (
    `${day}, about ${roundHalf(m.hours)} of direct sun${glancing}, reaching about ` +
    `${m.depthPerMetre.toFixed(1)} m in per metre of window height`
  );
}

function explain(lat: number, facing: WindowFacing, months: DirectSunMonth[]): string {
  const winter = months[lat >= 0 ? 11 : 5];
  const summer = months[lat >= 0 ? 5 : 11];
  const parts: string[] = [
    `This is worked out from the sun's path alone, for the 21st of each month. It assumes a clear ` +
      `sky, an open horizon (no buildings, trees, balconies or eaves in the way) and an upright ` +
      `window facing ${FACING_WORDS[facing]}, and it ignores sun less than ` +
      `${DIRECT_SUN_MIN_ALTITUDE}° above the horizon. "Depth" is how far the sunny patch reaches into ` +
      `the room for each metre of window height above the sill or shelf.`,
    facingSentence(lat, facing),
    Math.abs(lat) < TROPIC_LATITUDE
      ? `At ${formatLatitude(lat)}: ${describeDay(months[11])}; ${describeDay(months[5])}.`
      : `At ${formatLatitude(lat)}: ${describeDay(winter)} (midwinter); ${describeDay(summer)} (midsummer).`,
  ];
  const dark = months.filter((m) => !m.getsDirectSun).map((m) => MONTH_NAMES[m.month - 1]);
  if (dark.length === 12) parts.push("This window gets no direct sun in any month.");
  else if (dark.length > 0) parts.push(`No direct sun to speak of in: ${dark.join(", ")}.`);
  parts.push(
    "Walls, trees and neighbouring buildings often cut this down; a light sensor in the spot shows " +
      "what it really gets.",
  );
  return parts.join(" ");
}

/**
 * For each month, whether direct sun comes through a vertical window of the given facing, for how
 * long and how deep into the room. Sun position sampled every 15 minutes on the 21st. Counted as
 * direct sun: the sun's azimuth within 90° of the window's outward normal and its altitude above
 * 5°. Assumed: clear sky, unobstructed horizon, no overhang, upright glass.
 */
// The estimate samples the sun's path over a year; a fit table asks for the same few facings often.
const directSunCache = new Map<string, DirectSunEstimate>();

export function directSunMonths(lat: number, facing: SpotFacing, year: number = DEFAULT_YEAR): DirectSunEstimate {
  const key = `${lat.toFixed(2)}:${facing}:${year}`;
  let hit = directSunCache.get(key);
  if (!hit) {
    hit = computeDirectSunMonths(lat, facing, year);
    if (directSunCache.size > 500) directSunCache.clear();
    directSunCache.set(key, hit);
  }
  return hit;
}

function computeDirectSunMonths(lat: number, facing: SpotFacing, year: number): DirectSunEstimate {
  if (facing === "none") {
    return {
      facing,
      latitude: lat,
      months: null,
      explanation:
        "This spot is not behind a window (or its facing is not set), so Nichewise makes no " +
        "direct-sun estimate for it. A light sensor in the spot shows what it really gets.",
    };
  }
  const normal = FACING_AZIMUTH[facing];
  const months = Array.from({ length: 12 }, (_, m) => directSunOnThe21st(lat, normal, year, m));
  return { facing, latitude: lat, months, explanation: explain(lat, facing, months) };
}
