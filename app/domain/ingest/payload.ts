// What a sensor may send, and why a message is refused. Pure: shared by MQTT, HTTP and CSV ingest.
import { z } from "zod";

export const TOPIC_PREFIX = "nichewise/sensors";
export const CHANNEL_TOPICS = ["temperature", "humidity", "lux", "battery"] as const;
export type ChannelTopic = (typeof CHANNEL_TOPICS)[number];

export type Reading = {
  sensorId: number;
  measuredAt: Date;
  temperature: number | null;
  humidity: number | null;
  lux: number | null;
  battery: number | null;
  /** From a single-channel topic: may be merged with another channel sent at the same second. */
  partial?: boolean;
};

export type ParseResult = { ok: true; reading: Reading } | { ok: false; reason: string };

// How far ahead of the receiver's clock a timestamp may be (sensor clocks drift).
export const MAX_FUTURE_MS = 5 * 60 * 1000;
// Older than this is refused as a likely clock fault (a logger's backlog is accepted up to here).
export const MAX_PAST_MS = 3 * 365 * 24 * 3600 * 1000;
export const MAX_PAYLOAD_BYTES = 4096;

/** Sensor ids are PostgreSQL integers: anything else names no sensor. */
export const MAX_SENSOR_ID = 2_147_483_647;
export const isSensorId = (n: number) => Number.isInteger(n) && n > 0 && n <= MAX_SENSOR_ID;

/**
 * The largest temperature change a sensor's reading can make between two readings `minutes` apart:
 * 20 °C at once plus 5 °C a minute. Air around plants does not move that fast: the quickest real
 * swings are a sun patch reaching a sensor or a heater starting beside it, a few °C a minute at
 * most, and a housed sensor lags the air by a time constant of a minute or more (memory: typical of
 * consumer sensors in vented cases). A larger step is a fault: a °F sensor that lost its unit
 * (18 °C → 64.4), a probe shorting, bits read as the wrong type.
 */
export const maxTemperatureStep = (minutes: number) => 20 + 5 * minutes;
/** The jump check compares only with a previous reading at most this far away in measuring time. */
export const JUMP_WINDOW_MS = 5 * 60 * 1000;

/**
 * Why `t` (°C) at `ms` cannot follow the sensor's previous reading, or null when it can.
 * Only a previous reading within JUMP_WINDOW_MS counts: after a gap the sensor may have been moved.
 */
export function implausibleJump(previous: { ms: number; t: number } | undefined, ms: number, t: number): string | null {
  if (previous === undefined) return null;
  const dt = Math.abs(ms - previous.ms);
  if (dt > JUMP_WINDOW_MS) return null;
  const step = Math.abs(t - previous.t);
  const minutes = dt / 60_000;
  if (step <= maxTemperatureStep(minutes)) return null;
  return (
    `temperature: ${round1(previous.t)} → ${round1(t)} °C in ` +
    `${dt <= 60_000 ? `${Math.round(dt / 1000)} s` : `${round1(minutes)} min`}` +
    ` is a jump no sensor makes (over ` +
    `${round1(maxTemperatureStep(minutes))} °C); a °F sensor ` +
    `without "unit":"F"?`
  );
}

// The smallest normal single-precision float. A non-zero value below it is no measurement: it is
// what integer bits read as a float give (5e-324 is the double with bit pattern 1), and PostgreSQL's
// real would store it as 0 or refuse it.
const FLOAT32_MIN_NORMAL = 1.1754943508222875e-38;

// What a sensor's spot can physically see. Indoors, -80 °C or 70 °C means a broken probe.
export const LIMITS = {
  indoor: { tMin: -20, tMax: 55 },
  outdoor: { tMin: -60, tMax: 65 },
  unplaced: { tMin: -60, tMax: 65 },
} as const;
export type SpotKindForLimits = keyof typeof LIMITS;

const finite = z.number().refine(Number.isFinite, "not a finite number");
const num = z
  .union(
    [
      finite,
      z
        .string()
        .trim()
        .regex(/^-?\d+(\.\d+)?$/)
        .transform(Number),
    ],
    { error: "not a number" },
  )
  .refine(Number.isFinite, "not a finite number")
  .refine(
    (n) => n === 0 || Math.abs(n) >= FLOAT32_MIN_NORMAL,
    "a subnormal number (raw bits read as a float?), not a measurement",
  );

const timeField = z.union([
  z.number().refine(Number.isFinite, "not a finite number"),
  z.string().trim().min(1).max(40),
]);

export const readingPayloadSchema = z
  .object({
    time: timeField.optional(),
    temperature: num.nullish(),
    humidity: num.nullish(),
    lux: num.nullish(),
    battery: num.nullish(),
    unit: z.enum(["C", "F", "c", "f"]).optional(),
  })
  .strip();

export type ReadingPayload = z.input<typeof readingPayloadSchema>;

/** Epoch seconds, epoch milliseconds, or an ISO 8601 instant with a zone (Z or ±hh:mm). */
export function parseInstant(value: number | string): Date | null {
  if (typeof value === "number") {
    const ms = value > 1e11 ? value : value * 1000;
    const d = new Date(ms);
    return Number.isNaN(d.getTime()) ? null : d;
  }
  if (/^\d+(\.\d+)?$/.test(value)) return parseInstant(Number(value));
  const m = /^(\d{4})-(\d{2})-(\d{2})[T ]\d{2}:\d{2}(:\d{2}(\.\d{1,9})?)?(Z|[+-]\d{2}:?\d{2})$/i.exec(value);
  if (!m) return null;
  // V8 rolls an impossible day over (30 February becomes 1 March); a sensor sending one has a bad clock.
  const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (new Date(Date.UTC(year, month - 1, day)).getUTCDate() !== day) return null;
  const d = new Date(value.replace(" ", "T"));
  return Number.isNaN(d.getTime()) ? null : d;
}

function firstIssue(error: z.ZodError) {
  const i = error.issues[0];
  const field = i.path.join(".") || "payload";
  return `${field}: ${i.message}`;
}

export function validateReading(
  sensorId: number,
  payload: ReadingPayload,
  opts: { now: Date; kind: SpotKindForLimits; previous?: { ms: number; t: number } },
): ParseResult {
  const parsed = readingPayloadSchema.safeParse(payload);
  if (!parsed.success) return { ok: false, reason: firstIssue(parsed.error) };
  const p = parsed.data;
  if (p.temperature == null && p.humidity == null && p.lux == null && p.battery == null) {
    return { ok: false, reason: "no known field: send temperature, humidity, lux or battery" };
  }
  let measuredAt = opts.now;
  if (p.time !== undefined) {
    const d = parseInstant(p.time);
    if (!d) return { ok: false, reason: "time: not an ISO 8601 instant with a zone, or epoch seconds/milliseconds" };
    measuredAt = d;
  }
  if (measuredAt.getTime() > opts.now.getTime() + MAX_FUTURE_MS) {
    return { ok: false, reason: "time: more than 5 minutes in the future (check the sensor's clock)" };
  }
  if (measuredAt.getTime() < opts.now.getTime() - MAX_PAST_MS) {
    return { ok: false, reason: "time: more than 3 years in the past" };
  }
  let temperature = p.temperature ?? null;
  if (temperature != null && (p.unit === "F" || p.unit === "f")) temperature = ((temperature - 32) * 5) / 9;
  const lim = LIMITS[opts.kind];
  if (temperature != null && (temperature < lim.tMin || temperature > lim.tMax)) {
    return {
      ok: false,
      reason:
        `temperature: ${round1(temperature)} °C is outside what ` +
        `${opts.kind === "indoor" ? "an indoor" : "this"} spot can see (` +
        `${lim.tMin} to ${lim.tMax} °C)`,
    };
  }
  const measuredMs = Math.floor(measuredAt.getTime() / 1000) * 1000;
  if (temperature != null && opts.previous !== undefined) {
    const jump = implausibleJump(opts.previous, measuredMs, temperature);
    if (jump) return { ok: false, reason: jump };
  }
  const humidity = p.humidity ?? null;
  if (humidity != null && (humidity < 0 || humidity > 100)) {
    return { ok: false, reason: `humidity: ${round1(humidity)} % is outside 0–100 %` };
  }
  const lux = p.lux ?? null;
  if (lux != null && (lux < 0 || lux > 200_000))
    return { ok: false, reason: `lux: ${round1(lux)} is outside 0–200,000` };
  const battery = p.battery ?? null;
  if (battery != null && (battery < 0 || battery > 100))
    return { ok: false, reason: `battery: ${round1(battery)} is outside 0–100 %` };
  return {
    ok: true,
    reading: {
      sensorId,
      measuredAt: new Date(measuredMs),
      temperature: tidy(temperature),
      humidity: tidy(humidity),
      lux: tidy(lux),
      battery: tidy(battery),
    },
  };
}

const round1 = (n: number) => Math.round(n * 10) / 10;
// PostgreSQL's real refuses a value that underflows (e.g. 5e-324: "out of range for type real"),
// which would fail the whole group commit and make the sensor resend it forever. No sensor
// resolves a millionth of a unit, so values are kept to six decimals.
const tidy = (n: number | null) => (n === null ? null : Math.round(n * 1e6) / 1e6 || 0);

export type TopicMatch = { sensorId: number; channel: ChannelTopic | "reading" } | null;

/** nichewise/sensors/<id>/reading (JSON) or nichewise/sensors/<id>/<channel> (a plain number). */
export function parseTopic(topic: string): TopicMatch {
  const parts = topic.split("/");
  if (parts.length !== 4 || `${parts[0]}/${parts[1]}` !== TOPIC_PREFIX) return null;
  const sensorId = Number(parts[2]);
  if (!Number.isInteger(sensorId) || sensorId <= 0 || String(sensorId) !== parts[2]) return null;
  const channel = parts[3];
  if (channel === "reading" || (CHANNEL_TOPICS as readonly string[]).includes(channel)) {
    return { sensorId, channel: channel as ChannelTopic | "reading" };
  }
  return null;
}

// One decoder for every message: decode() without { stream: true } keeps no state between calls.
const utf8 = new TextDecoder("utf-8", { fatal: true });

/** Turns the bytes of one MQTT message into a payload object, or the reason it can't be read. */
export function decodeMessage(
  channel: ChannelTopic | "reading",
  bytes: Uint8Array,
): { ok: true; payload: ReadingPayload } | { ok: false; reason: string } {
  if (bytes.length === 0) return { ok: false, reason: "empty payload" };
  if (bytes.length > MAX_PAYLOAD_BYTES) return { ok: false, reason: `payload over ${MAX_PAYLOAD_BYTES} bytes` };
  let text: string;
  try {
    text = utf8
      .decode(bytes)
      .replace(/^\uFEFF/, "")
      .trim();
  } catch {
    return { ok: false, reason: "payload is not UTF-8 text" };
  }
  if (channel !== "reading") {
    if (!/^-?\d+(\.\d+)?([eE][-+]?\d+)?$/.test(text))
      return { ok: false, reason: `${channel}: plain payload is not a number` };
    return { ok: true, payload: { [channel]: Number(text) } };
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    return { ok: false, reason: "payload is not JSON" };
  }
  if (typeof value !== "object" || value === null || Array.isArray(value)) {
    return { ok: false, reason: "payload is not a JSON object" };
  }
  return { ok: true, payload: value as ReadingPayload };
}
