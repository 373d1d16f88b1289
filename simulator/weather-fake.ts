// A local stand-in for the hosted weather service (Open-Meteo's documented JSON API): the same
// paths (/v1/archive, /v1/forecast), parameters and response shape, backed by the simulator's
// climate, so `npm start`, the demo and every test run offline and see the very weather the
// simulated sensors were generated from. Only what Nichewise asks for is spoken; anything else is a
// 400 with the service's `{ error: true, reason }` body.
import http from "node:http";
import type { AddressInfo } from "node:net";
import { zoneClock } from "~/domain/season/local-time";
import { outdoorWeather, scenarioAt, type ColdFront, type OutdoorWeather } from "./model";

const HOUR = 3_600_000;
const DAY = 86_400_000;

export const WEATHER_VARIABLES = {
  temperature_2m: { unit: "°C", pick: (w: OutdoorWeather) => round1(w.temperature) },
  relative_humidity_2m: { unit: "%", pick: (w: OutdoorWeather) => Math.round(w.humidity) },
  cloud_cover: { unit: "%", pick: (w: OutdoorWeather) => w.cloudCover },
  wind_speed_10m: { unit: "km/h", pick: (w: OutdoorWeather) => w.windSpeed },
  shortwave_radiation: { unit: "W/m²", pick: (w: OutdoorWeather) => w.shortwave },
} as const;
type Variable = keyof typeof WEATHER_VARIABLES;

export type WeatherFakeOptions = {
  port?: number;
  host?: string;
  /** The service's clock: what counts as past (archive) and future (forecast). */
  now?: () => number;
  /** The scripted front of `start:cold-front`, in the weather of every place. */
  coldFront?: ColdFront;
  /** The archive's lag behind today (reanalysis arrives days late), days. */
  archiveDelayDays?: number;
  log?: (s: string) => void;
};

export type WeatherFake = {
  url: string;
  port: number;
  /** Requests answered, by path: tests check that a stored site is not fetched twice. */
  requests: { path: string; query: string }[];
  /** "down" answers 503, "slow" holds every answer for `slowMs`: for tests of a failing service. */
  mode: "up" | "down" | "slow";
  slowMs: number;
  close: () => Promise<void>;
};

const MAX_DAYS_PER_REQUEST = 366 * 2;
const round1 = (x: number) => Math.round(x * 10) / 10;

class BadRequest extends Error {}

export async function startWeatherFake(opts: WeatherFakeOptions = {}): Promise<WeatherFake> {
  const now = opts.now ?? Date.now;
  const places = new Map<string, (t: Date) => OutdoorWeather>();
  const weatherAt = (lat: number, lon: number) => {
    const key = `${lat.toFixed(4)},${lon.toFixed(4)}`;
    let f = places.get(key);
    if (!f) {
      const scenario = { ...scenarioAt(lat, lon), coldFront: opts.coldFront };
      f = outdoorWeather({ latitude: lat, longitude: lon, timeZone: "UTC" }, scenario);
      if (places.size >= 64) places.clear();
      places.set(key, f);
    }
    return f;
  };

  const fake: WeatherFake = {
    url: "",
    port: 0,
    requests: [],
    mode: "up",
    slowMs: 30_000,
    close: async () => {},
  };

  const server = http.createServer((req, res) => {
    const send = (status: number, body: unknown) => {
      if (res.destroyed) return;
      res.writeHead(status, { "content-type": "application/json; charset=utf-8" });
      res.end(JSON.stringify(body));
    };
    const url = new URL(req.url ?? "/", "http://fake");
    if (fake.requests.length > 10_000) fake.requests.splice(0, 5_000);
    fake.requests.push({ path: url.pathname, query: url.search });
    if (req.method !== "GET") return send(405, { error: true, reason: "Only GET is supported" });
    if (fake.mode === "down") return send(503, { error: true, reason: "Service unavailable (fake: down)" });
    const answer = () => {
      try {
        if (url.pathname === "/v1/archive") return send(200, answerHourly(url.searchParams, "archive"));
        if (url.pathname === "/v1/forecast") return send(200, answerHourly(url.searchParams, "forecast"));
        return send(404, { error: true, reason: "Not found" });
      } catch (err) {
        if (err instanceof BadRequest) return send(400, { error: true, reason: err.message });
        return send(500, { error: true, reason: "Internal error" });
      }
    };
    if (fake.mode === "slow") {
      const timer = setTimeout(answer, fake.slowMs);
      res.on("close", () => clearTimeout(timer));
    } else answer();
  });

  function answerHourly(q: URLSearchParams, kind: "archive" | "forecast") {
    const started = performance.now();
    const lat = coordinate(q.get("latitude"), 90, "latitude");
    const lon = coordinate(q.get("longitude"), 180, "longitude");
    const variables = (q.get("hourly") ?? "").split(",").filter(Boolean);
    if (variables.length === 0 || variables.length > 12)
      throw new BadRequest("Parameter 'hourly' must list 1 to 12 variables");
    for (const v of variables) {
      if (!(v in WEATHER_VARIABLES))
        throw new BadRequest(
          `Cannot initialize WeatherVariable from invalid String value ${v.slice(0, 40)} for key hourly`,
        );
    }
    const tzName = q.get("timezone") ?? "GMT";
    const utc = tzName === "GMT" || tzName === "UTC";
    if (!utc && !isZone(tzName)) throw new BadRequest(`Invalid timezone`);
    const offsetAt = utc ? () => 0 : zoneClock(tzName).offsetAt;
    const unixtime = q.get("timeformat") === "unixtime";
    if (q.has("timeformat") && !["unixtime", "iso8601"].includes(q.get("timeformat")!))
      throw new BadRequest("Invalid timeformat");

    const today = Math.floor((now() + offsetAt(now())) / DAY);
    let firstDay: number;
    let lastDay: number;
    if (q.has("start_date") || q.has("end_date")) {
      firstDay = dayOf(q.get("start_date"), "start_date");
      lastDay = dayOf(q.get("end_date"), "end_date");
    } else if (kind === "archive") {
      throw new BadRequest("Parameter 'start_date' and 'end_date' are required");
    } else {
      const past = intParam(q.get("past_days"), 0, 92, 0, "past_days");
      const ahead = intParam(q.get("forecast_days"), 0, 16, 7, "forecast_days");
      firstDay = today - past;
      lastDay = today + ahead - 1;
    }
    if (lastDay < firstDay) throw new BadRequest("End-date must be larger or equal than start-date");
    if (lastDay - firstDay + 1 > MAX_DAYS_PER_REQUEST)
      throw new BadRequest(`At most ${MAX_DAYS_PER_REQUEST} days per request`);
    if (kind === "archive" && firstDay < Date.UTC(1940, 0, 1) / DAY)
      throw new BadRequest("Parameter 'start_date' is out of allowed range from 1940-01-01");
    if (kind === "forecast" && (firstDay < today - 92 || lastDay > today + 16))
      throw new BadRequest("Parameter 'start_date' or 'end_date' is out of the allowed range");

    // The archive has nothing yet for its last few days: the service answers null there.
    const archiveEnd = now() - (opts.archiveDelayDays ?? 5) * DAY;
    const weather = weatherAt(lat, lon);
    const time: (number | string)[] = [];
    const columns = variables.map(() => [] as (number | null)[]);
    // Local midnight of the first day, then whole hours; a DST change shows as a skipped or repeated local hour.
    const localStart = firstDay * DAY;
    const startUtc = localStart - offsetAt(localStart - offsetAt(localStart));
    const endUtc = (lastDay + 1) * DAY - offsetAt((lastDay + 1) * DAY);
    for (let t = startUtc; t < endUtc; t += HOUR) {
      time.push(unixtime ? t / 1000 : new Date(t + offsetAt(t)).toISOString().slice(0, 16));
      const known = kind === "forecast" || t <= archiveEnd;
      const w = known ? weather(new Date(t)) : null;
      variables.forEach((v, i) => columns[i].push(w ? WEATHER_VARIABLES[v as Variable].pick(w) : null));
    }
    const hourly: Record<string, unknown[]> = { time };
    const hourlyUnits: Record<string, string> = { time: unixtime ? "unixtime" : "iso8601" };
    variables.forEach((v, i) => {
      hourly[v] = columns[i];
      hourlyUnits[v] = WEATHER_VARIABLES[v as Variable].unit;
    });
    return {
      latitude: round4(lat),
      longitude: round4(lon),
      generationtime_ms: performance.now() - started,
      utc_offset_seconds: offsetAt(startUtc) / 1000,
      timezone: utc ? "GMT" : tzName,
      timezone_abbreviation: utc ? "GMT" : tzName,
      elevation: 60,
      hourly_units: hourlyUnits,
      hourly,
    };
  }

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port ?? 0, opts.host ?? "127.0.0.1", () => resolve());
  });
  const port = (server.address() as AddressInfo).port;
  fake.port = port;
  fake.url = `http://${opts.host ?? "127.0.0.1"}:${port}`;
  fake.close = () =>
    new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeAllConnections();
    });
  opts.log?.(`Weather service fake on ${fake.url} (/v1/archive, /v1/forecast)`);
  return fake;
}

const round4 = (x: number) => Math.round(x * 10_000) / 10_000;

function coordinate(value: string | null, limit: number, name: string): number {
  const n = value === null || value.length > 20 ? NaN : Number(value);
  if (!Number.isFinite(n) || Math.abs(n) > limit)
    throw new BadRequest(`Parameter '${name}' must be a number between -${limit} and ${limit}`);
  return n;
}

function intParam(value: string | null, lo: number, hi: number, fallback: number, name: string): number {
  if (value === null) return fallback;
  const n = /^\d{1,3}$/.test(value) ? Number(value) : NaN;
  if (!(n >= lo && n <= hi)) throw new BadRequest(`Parameter '${name}' must be between ${lo} and ${hi}`);
  return n;
}

function dayOf(value: string | null, name: string): number {
  const m = value === null ? null : /^(\d{4})-(\d{2})-(\d{2})$/.exec(value);
  if (!m) throw new BadRequest(`Parameter '${name}' must be a date as yyyy-mm-dd`);
  const t = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  if (new Date(t).toISOString().slice(0, 10) !== value)
    throw new BadRequest(`Parameter '${name}' is not a calendar date`);
  return t / DAY;
}

function isZone(name: string): boolean {
  if (name.length > 64) return false;
  try {
    new Intl.DateTimeFormat("en", { timeZone: name });
    return true;
  } catch {
    return false;
  }
}
