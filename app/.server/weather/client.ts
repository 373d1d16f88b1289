// The hosted weather service's documented JSON API (Open-Meteo's /v1/archive and /v1/forecast),
// validated with zod. Every call has a timeout and a bounded body: a slow or broken service is an
// error here, never a hang for the caller (see docs/decisions/0002-weather-service.md).
import { z } from "zod";

export type WeatherEndpoints = { archiveUrl: string; forecastUrl: string; apiKey?: string; timeoutMs?: number };

/** Hourly outdoor weather from `start` (UTC ms, whole hour), one value per hour; null where the service has none. */
export type HourlySeries = {
  start: number;
  temperature: (number | null)[];
  humidity: (number | null)[];
  cloud: (number | null)[];
  wind: (number | null)[];
  shortwave: (number | null)[];
};

export const HOURLY_VARIABLES = "temperature_2m,relative_humidity_2m,cloud_cover,wind_speed_10m,shortwave_radiation";

const HOUR = 3_600_000;
const MAX_BODY_BYTES = 16 * 1024 * 1024;
const MAX_HOURS = 24 * 800;

const column = z.array(z.number().finite().nullable()).max(MAX_HOURS);
const responseSchema = z.object({
  latitude: z.number(),
  longitude: z.number(),
  utc_offset_seconds: z.number().int(),
  hourly_units: z.object({
    time: z.literal("unixtime"),
    temperature_2m: z.literal("°C"),
    wind_speed_10m: z.literal("km/h"),
  }),
  hourly: z.object({
    time: z.array(z.number().int()).max(MAX_HOURS),
    temperature_2m: column,
    relative_humidity_2m: column,
    cloud_cover: column,
    wind_speed_10m: column,
    shortwave_radiation: column,
  }),
});

export class WeatherServiceError extends Error {}

export type HourlyRequest =
  | { kind: "archive"; startDate: string; endDate: string }
  | { kind: "forecast"; pastDays: number; forecastDays: number };

export async function fetchHourly(
  ep: WeatherEndpoints,
  place: { latitude: number; longitude: number },
  req: HourlyRequest,
  signal?: AbortSignal,
): Promise<HourlySeries> {
  const url = new URL(req.kind === "archive" ? ep.archiveUrl : ep.forecastUrl);
  const q = url.searchParams;
  q.set("latitude", place.latitude.toFixed(4));
  q.set("longitude", place.longitude.toFixed(4));
  q.set("hourly", HOURLY_VARIABLES);
  // UTC instants as Unix seconds: no local-time parsing on our side.
  q.set("timezone", "GMT");
  q.set("timeformat", "unixtime");
  if (req.kind === "archive") {
    q.set("start_date", req.startDate);
    q.set("end_date", req.endDate);
  } else {
    q.set("past_days", String(req.pastDays));
    q.set("forecast_days", String(req.forecastDays));
  }
  if (ep.apiKey) q.set("apikey", ep.apiKey);
  const timeout = AbortSignal.timeout(ep.timeoutMs ?? 20_000);
  const res = await fetch(url, {
    signal: signal ? AbortSignal.any([signal, timeout]) : timeout,
    headers: { accept: "application/json" },
  }).catch((err: unknown) => {
    throw new WeatherServiceError(`weather service unreachable: ${err instanceof Error ? err.message : err}`);
  });
  const text = await readBounded(res);
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw new WeatherServiceError(`weather service answered ${res.status} with something that is not JSON`);
  }
  if (!res.ok) {
    const reason = z.object({ reason: z.string() }).safeParse(body);
    throw new WeatherServiceError(
      `weather service answered ${res.status}: ${reason.success ? reason.data.reason.slice(0, 200) : "no reason given"}`,
    );
  }
  const parsed = responseSchema.safeParse(body);
  if (!parsed.success)
    throw new WeatherServiceError(
      `weather service answer not understood: ${parsed.error.issues[0]?.path.join(".")} ${parsed.error.issues[0]?.message}`,
    );
  const h = parsed.data.hourly;
  const n = h.time.length;
  if (
    [h.temperature_2m, h.relative_humidity_2m, h.cloud_cover, h.wind_speed_10m, h.shortwave_radiation].some(
      (c) => c.length !== n,
    )
  ) {
    throw new WeatherServiceError("weather service answer has columns of different lengths");
  }
  if (n === 0) return { start: 0, temperature: [], humidity: [], cloud: [], wind: [], shortwave: [] };
  const start = h.time[0] * 1000;
  for (let i = 0; i < n; i++) {
    if (h.time[i] * 1000 !== start + i * HOUR)
      throw new WeatherServiceError("weather service answer is not a run of whole hours");
  }
  return {
    start,
    temperature: h.temperature_2m,
    humidity: h.relative_humidity_2m,
    cloud: h.cloud_cover,
    wind: h.wind_speed_10m,
    shortwave: h.shortwave_radiation,
  };
}

async function readBounded(res: Response): Promise<string> {
  const reader = res.body?.getReader();
  if (!reader) return "";
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read().catch((err: unknown) => {
      throw new WeatherServiceError(`weather service answer cut off: ${err instanceof Error ? err.message : err}`);
    });
    if (done) break;
    size += value.byteLength;
    if (size > MAX_BODY_BYTES) {
      await reader.cancel().catch(() => {});
      throw new WeatherServiceError("weather service answer too large");
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks).toString("utf8");
}
