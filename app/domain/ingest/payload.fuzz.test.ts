// Bad input for the MQTT payload path (decodeMessage, then validateReading): whatever arrives is
// either accepted as a reading within the documented limits or refused with a reason; nothing
// throws. Property-based with fast-check, plus hand-picked nasties.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  CHANNEL_TOPICS,
  decodeMessage,
  LIMITS,
  MAX_FUTURE_MS,
  MAX_PAST_MS,
  implausibleJump,
  parseInstant,
  validateReading,
  type ChannelTopic,
} from "~/domain/ingest/payload";

const NOW = new Date("2026-06-15T12:00:00Z");
const CHANNELS: (ChannelTopic | "reading")[] = ["reading", ...CHANNEL_TOPICS];

/** The whole MQTT path for one message; checks the outcome's shape and returns it. */
function ingest(channel: ChannelTopic | "reading", bytes: Uint8Array, kind: keyof typeof LIMITS = "indoor") {
  const decoded = decodeMessage(channel, bytes);
  if (!decoded.ok) {
    expect(decoded.reason).toMatch(/\S/);
    return decoded;
  }
  const r = validateReading(7, decoded.payload, { now: NOW, kind });
  if (!r.ok) {
    expect(r.reason).toMatch(/\S/);
    return r;
  }
  const { reading } = r;
  // What "accepted" promises downstream (the writer's real columns and the rollups' arithmetic).
  const t = reading.measuredAt.getTime();
  expect(Number.isInteger(t / 1000)).toBe(true);
  expect(t).toBeGreaterThanOrEqual(NOW.getTime() - MAX_PAST_MS);
  expect(t).toBeLessThanOrEqual(NOW.getTime() + MAX_FUTURE_MS);
  const values = [reading.temperature, reading.humidity, reading.lux, reading.battery];
  expect(values.some((v) => v !== null)).toBe(true);
  for (const v of values) if (v !== null) expect(Number.isFinite(v)).toBe(true);
  if (reading.temperature !== null) {
    expect(reading.temperature).toBeGreaterThanOrEqual(LIMITS[kind].tMin);
    expect(reading.temperature).toBeLessThanOrEqual(LIMITS[kind].tMax);
  }
  if (reading.humidity !== null) expect(reading.humidity >= 0 && reading.humidity <= 100).toBe(true);
  if (reading.lux !== null) expect(reading.lux >= 0 && reading.lux <= 200_000).toBe(true);
  if (reading.battery !== null) expect(reading.battery >= 0 && reading.battery <= 100).toBe(true);
  return r;
}

const utf8 = (s: string) => new TextEncoder().encode(s);
const field = fc.oneof(
  fc.double(),
  fc.integer(),
  fc.string(),
  fc.constantFrom("NaN", "Infinity", "-Infinity", "1e309", "-0", "0x1A", "1_000", "12,5", " 21.5 ", "", null),
  fc.constant(undefined),
  fc.jsonValue({ maxDepth: 3 }),
);
const timeArb = fc.oneof(
  fc.date({ min: new Date(-8.64e15), max: new Date(8.64e15), noInvalidDate: true }).map((d) => d.toISOString()),
  fc.integer({ min: -1e15, max: 1e15 }),
  fc.double(),
  fc.string({ maxLength: 45 }),
  fc
    .date({ min: new Date("2023-01-01"), max: new Date("2026-06-15T12:04:00Z"), noInvalidDate: true })
    .map((d) => Math.floor(d.getTime() / 1000)),
);
const payloadArb = fc.record(
  {
    time: timeArb,
    temperature: field,
    humidity: field,
    lux: field,
    battery: field,
    unit: fc.constantFrom("C", "F", "K", "f", 1),
  },
  { requiredKeys: [] },
);

describe("MQTT payloads, property-based", () => {
  it("random bytes on every topic: accepted within limits or refused with a reason", () => {
    fc.assert(
      fc.property(fc.constantFrom(...CHANNELS), fc.uint8Array({ maxLength: 600 }), (channel, bytes) => {
        ingest(channel, bytes);
      }),
      { numRuns: 2000 },
    );
  });

  it("random JSON values and strings on the reading topic", () => {
    fc.assert(
      fc.property(
        fc.oneof(
          fc.jsonValue().map((v) => JSON.stringify(v) ?? "null"),
          fc.string({ unit: "binary" }),
        ),
        (text) => {
          ingest("reading", utf8(text));
        },
      ),
      { numRuns: 2000 },
    );
  });

  it("objects with the known fields holding anything, indoors and outdoors", () => {
    fc.assert(
      fc.property(payloadArb, fc.constantFrom("indoor", "outdoor", "unplaced" as const), (p, kind) => {
        const r = ingest("reading", utf8(JSON.stringify(p)), kind);
        // A temperature that is neither missing nor a plain number must never be read as one.
        if (r.ok && p.temperature !== undefined && p.temperature !== null && p.temperature !== "") {
          expect(typeof p.temperature === "number" || /^\s*-?\d+(\.\d+)?\s*$/.test(String(p.temperature))).toBe(true);
        }
      }),
      { numRuns: 3000 },
    );
  });

  it("plain numbers on the channel topics: a finite number in range, or a reason", () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...CHANNEL_TOPICS),
        fc.oneof(fc.double().map(String), fc.string({ maxLength: 30 })),
        (channel, text) => {
          const r = ingest(channel, utf8(text));
          if (r.ok && "reading" in r) expect(r.reading[channel]).toBeCloseTo(Number(text.trim()), 6);
        },
      ),
      { numRuns: 2000 },
    );
  });
});

describe("MQTT payloads, hand-picked nasties", () => {
  const refused = (
    channel: ChannelTopic | "reading",
    input: string | Uint8Array,
    reason: RegExp,
    kind: keyof typeof LIMITS = "indoor",
  ) => {
    const r = ingest(channel, typeof input === "string" ? utf8(input) : input, kind);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(reason);
  };

  it("huge and non-finite numbers", () => {
    refused("reading", '{"temperature":1e309}', /temperature: not a number/); // JSON.parse gives Infinity
    refused("reading", '{"temperature":1e308}', /temperature: .* outside/);
    refused("reading", '{"humidity":-1e308}', /humidity: .* outside/);
    refused("temperature", "1e309", /temperature: not a number/);
    refused("lux", "99999999999999999999999", /lux: .* outside/);
    refused("battery", "-0.0000001", /battery: .* outside/);
  });

  it("NaN and other strings where a number belongs", () => {
    for (const v of ["NaN", "Infinity", "-Infinity", "0x1A", "1_000", "12,5", "1e3", "", "21.5°C", "true"]) {
      refused("reading", JSON.stringify({ temperature: v }), /temperature|no known field/);
      refused("temperature", v, /not a number|empty payload|outside/); // plain "1e3" is a number: 1000 °C
    }
    refused("reading", '{"temperature":true}', /temperature: not a number/);
    refused("reading", '{"temperature":[21]}', /temperature: not a number/);
    refused("reading", '{"temperature":{"value":21}}', /temperature: not a number/);
  });

  it("deep JSON within the size limit", () => {
    refused("reading", "[".repeat(2000) + "]".repeat(2000), /not a JSON object/);
    refused("reading", `{"temperature":${"[".repeat(1000)}${"]".repeat(1000)}}`, /temperature: not a number/);
    refused("reading", `${'{"a":'.repeat(600)}1${"}".repeat(600)}`, /no known field/);
  });

  it("binary, control characters, empty and oversized payloads", () => {
    refused("reading", new Uint8Array([0xff, 0xfe, 0x00, 0x80]), /not UTF-8/);
    refused("reading", new Uint8Array([0xc0, 0xaf]), /not UTF-8/); // overlong "/" (RFC 3629 §3 forbids it)
    refused("reading", "\u0000\u0001", /not JSON/);
    refused("reading", "", /empty payload/);
    refused("reading", new Uint8Array(10 * 1024 * 1024).fill(0x20), /payload over 4096 bytes/);
    refused("temperature", "21.5\u0000", /not a number/);
  });

  it("a BOM and surrounding whitespace are tolerated; __proto__ keys are not fields", () => {
    expect(ingest("reading", utf8('\uFEFF {"temperature":21.5}\r\n')).ok).toBe(true);
    expect(ingest("temperature", utf8("\uFEFF21.5\n")).ok).toBe(true);
    refused("reading", '{"__proto__":{"temperature":5}}', /no known field/);
    refused("reading", '{"constructor":{"prototype":{"temperature":5}}}', /no known field/);
  });

  it("dates in odd formats", () => {
    const at = (time: unknown) => ingest("reading", utf8(JSON.stringify({ time, temperature: 20 })));
    // Accepted: ISO 8601 instants with a zone (ISO 8601-1:2019 §4.3), epoch seconds and milliseconds.
    for (const ok of [
      "2026-06-15T11:00:00Z",
      "2026-06-15T12:00:00+01:00",
      "2026-06-15 11:00:00.123456789Z",
      "2026-06-15T11:00+0000",
      1781521200,
      1781521200000,
      "1781521200",
    ]) {
      const r = at(ok);
      expect(r.ok, String(ok)).toBe(true);
    }
    // Refused with a reason: no zone, impossible calendar dates, other calendars' notations, far ends.
    for (const bad of [
      "2026-06-15T11:00:00",
      "15/06/2026 11:00",
      "June 15, 2026 11:00 UTC",
      "2026-13-01T00:00Z",
      "2026-02-30T00:00:00Z",
      "2026-04-31T00:00:00Z",
      "2025-02-29T12:00:00Z",
      "2026-06-15T11:60:00Z",
      "2026-06-15T11:00:00+25:00",
      "+002026-06-15T11:00Z",
      "Mon, 15 Jun 2026 11:00:00 GMT",
      "",
      "  ",
      -1,
      1e20,
      0,
    ]) {
      const r = at(bad);
      expect(r.ok, JSON.stringify(bad)).toBe(false);
      if (!r.ok) expect(r.reason).toMatch(/time|payload/);
    }
    refused("reading", JSON.stringify({ time: "2026-06-15T12:06:00Z", temperature: 20 }), /future/);
    refused("reading", JSON.stringify({ time: "2020-01-01T00:00:00Z", temperature: 20 }), /3 years/);
  });

  it("parseInstant reads a leap day only in a leap year (Gregorian calendar)", () => {
    expect(parseInstant("2024-02-29T12:00:00Z")?.toISOString()).toBe("2024-02-29T12:00:00.000Z");
    expect(parseInstant("2025-02-29T12:00:00Z")).toBeNull();
    expect(parseInstant("2100-02-29T12:00:00Z")).toBeNull(); // divisible by 100, not by 400
    expect(parseInstant("2000-02-29T12:00:00Z")?.toISOString()).toBe("2000-02-29T12:00:00.000Z");
  });
});

describe("values PostgreSQL's real cannot hold", () => {
  it("a subnormal number is refused with its reason, not stored as 0 °C (and never fails the group commit)", () => {
    // 5e-324 is the smallest double (IEEE 754 binary64), 1e-40 a float32 subnormal (below 2^-126):
    // integer bits read as a float, not a measurement.
    for (const tiny of [-5e-324, 5e-324, 1e-40]) {
      const r = ingest("reading", utf8(JSON.stringify({ temperature: tiny, humidity: 50 })));
      expect(r.ok, JSON.stringify(r)).toBe(false);
      if (!r.ok) expect(r.reason).toMatch(/^temperature: a subnormal number/);
    }
    const plain = ingest("temperature", utf8("5e-324"));
    expect(plain.ok).toBe(false);
    // Zero and a tiny but normal value stay readings (the latter rounded to the sensor's resolution).
    for (const [t, stored] of [
      [0, 0],
      [-0, 0],
      [1e-7, 0],
      [0.0625, 0.0625],
    ]) {
      const r = ingest("reading", utf8(JSON.stringify({ temperature: t })));
      expect(r.ok && "reading" in r ? r.reading.temperature : r).toBe(stored);
    }
  });
});

describe("jumps no sensor makes", () => {
  const at = (s: number) => new Date(Date.UTC(2026, 0, 10, 12, 0, s));
  const now = at(600);
  const check = (previous: { ms: number; t: number } | undefined, body: object) =>
    validateReading(7, body as never, { now, kind: "outdoor", previous });

  it("refuses 18 → 64.4 °C in 60 s (a °F sensor without its unit) and says why", () => {
    const r = check({ ms: at(0).getTime(), t: 18 }, { time: at(60).toISOString(), temperature: 64.4 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/^temperature: 18 → 64\.4 °C in 60 s is a jump no sensor makes .*"unit":"F"/);
    // The same value with its unit is 18 °C and fine.
    expect(check({ ms: at(0).getTime(), t: 18 }, { time: at(60).toISOString(), temperature: 64.4, unit: "F" }).ok).toBe(
      true,
    );
  });

  it("accepts real swings, a large step after a gap of more than five minutes, and a first reading", () => {
    // A sun patch or a heater: a few °C a minute (common practice), well inside 20 °C + 5 °C/min.
    expect(check({ ms: at(0).getTime(), t: 18 }, { time: at(60).toISOString(), temperature: 26 }).ok).toBe(true);
    expect(check({ ms: at(0).getTime(), t: 24.9 }, { time: at(1).toISOString(), temperature: 18 }).ok).toBe(true);
    expect(
      check({ ms: at(0).getTime() - 6 * 60_000, t: 18 }, { time: at(0).toISOString(), temperature: 64.4 }).ok,
    ).toBe(true);
    expect(check(undefined, { time: at(0).toISOString(), temperature: 64.4 }).ok).toBe(true);
    // A reading earlier than the previous one is compared the same way.
    expect(check({ ms: at(60).getTime(), t: 64.4 }, { time: at(0).toISOString(), temperature: 18 }).ok).toBe(false);
    expect(implausibleJump({ ms: 0, t: 10 }, 120_000, 40)).toBeNull(); // 30 °C in 2 min: at the 20 + 10 limit
    expect(implausibleJump({ ms: 0, t: 10 }, 120_000, 40.5)).toMatch(/jump/);
  });
});
