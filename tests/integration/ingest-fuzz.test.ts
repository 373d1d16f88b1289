// Bad input for the HTTP ingest route and the CSV import, against the real database: every input
// is answered (accepted, or refused with a reason), nothing throws, and what is written is exactly
// what the answer says was stored — a request refused whole writes no rows.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { convertRows, importCsv } from "~/.server/ingest/csv-import";
import { CsvLimitError, parseCsv } from "~/.server/ingest/csv-file";
import { handleHttpIngest, MAX_HTTP_BATCH, MAX_HTTP_BYTES } from "~/.server/ingest/http";
import { CSV_MAX_BYTES, CSV_MAX_ROWS, DATE_FORMATS, guessMapping, type CsvMapping } from "~/domain/ingest/csv";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

async function sensorInSpot() {
  const user = await makeUser();
  const site = await makeSite(user);
  const spot = await makeSpot(site);
  return makeSensor(site, spot);
}

async function counts(sensorId: number) {
  const res = await pool().query<{ rows: number; rollup: number }>(
    `SELECT (SELECT count(*)::int FROM readings WHERE sensor_id = $1) AS rows,
       (SELECT coalesce(sum(t_n + h_n + lux_n), 0)::int FROM hourly_rollups h JOIN placements p ON p.spot_id = h.spot_id WHERE p.sensor_id = $1) AS rollup`,
    [sensorId],
  );
  return res.rows[0];
}

const post = (sensor: { id: number; secret: string }, body: BodyInit, headers: Record<string, string> = {}) =>
  handleHttpIngest(
    new Request("http://127.0.0.1/api/ingest", {
      method: "POST",
      headers: {
        Authorization: `Bearer ${sensor.id}.${sensor.secret}`,
        "Content-Type": "application/json",
        ...headers,
      },
      body,
      duplex: "half",
    } as RequestInit),
  );

type Answer = {
  error?: string;
  received?: number;
  accepted?: number;
  stored?: number;
  rejected?: { index: number; reason: string }[];
};

/** Posts, checks the answer's shape and that the rows written match what it reports. */
async function ingest(sensor: { id: number; secret: string }, body: BodyInit, headers?: Record<string, string>) {
  const before = await counts(sensor.id);
  const res = await post(sensor, body, headers);
  const answer = (await res.json()) as Answer;
  const after = await counts(sensor.id);
  expect([200, 400, 413]).toContain(res.status);
  if (res.status !== 200) {
    expect(answer.error).toMatch(/\S/);
    expect(after).toEqual(before); // refused whole: nothing written
  } else {
    expect(answer.accepted! + answer.rejected!.length).toBe(answer.received);
    for (const r of answer.rejected!) expect(r.reason).toMatch(/\S/);
    expect(after.rows - before.rows).toBe(answer.stored);
  }
  return { status: res.status, answer };
}

const NOW = Date.now();
const recentTime = fc
  .integer({ min: NOW - 30 * 86_400_000, max: NOW })
  .map((ms) => new Date(Math.floor(ms / 1000) * 1000).toISOString());
const reading = fc.record(
  {
    time: fc.oneof(recentTime, fc.string({ maxLength: 30 }), fc.integer(), fc.constant(null)),
    temperature: fc.oneof(
      fc.double({ min: -100, max: 100 }),
      fc.string({ maxLength: 8 }),
      fc.constant(null),
      fc.jsonValue({ maxDepth: 2 }),
    ),
    humidity: fc.oneof(fc.double({ min: -10, max: 110, noNaN: true }), fc.constant("NaN"), fc.constant(null)),
    lux: fc.oneof(fc.nat(300_000), fc.constant(-1)),
    unit: fc.constantFrom("C", "F", "K"),
  },
  { requiredKeys: [] },
);

describe("HTTP ingest under bad input", () => {
  it(
    "random batches and bodies: answered with reasons, rows written equal to what is reported",
    { timeout: 120_000 },
    async () => {
      const sensor = await sensorInSpot();
      await fc.assert(
        fc.asyncProperty(
          fc.oneof(
            fc
              .array(fc.oneof(reading, fc.jsonValue({ maxDepth: 2 })), { maxLength: 40 })
              .map((items) => JSON.stringify({ readings: items })),
            fc.array(reading, { maxLength: 20 }).map((items) => JSON.stringify(items)),
            reading.map((r) => JSON.stringify(r)),
            fc.jsonValue().map((v) => JSON.stringify(v) ?? ""),
            fc.string({ unit: "binary", maxLength: 200 }),
          ),
          async (body) => {
            await ingest(sensor, body);
          },
        ),
        { numRuns: 150 },
      );
    },
  );

  it(
    "hand-picked nasties: deep JSON, binary, BOM, huge numbers, 10 MB, too many readings",
    { timeout: 60_000 },
    async () => {
      const sensor = await sensorInSpot();
      const at = new Date(Math.floor((NOW - 3_600_000) / 1000) * 1000).toISOString();

      // Nested a million levels deep (4 MB): refused as a whole, not a crash (JSON.stringify of it would throw RangeError).
      const depth = 500_000;
      const deepItem = `{"readings":[${'{"a":'.repeat(depth)}1${"}".repeat(depth)}]}`;
      let r = await ingest(sensor, deepItem);
      expect(r.status).toBe(200);
      expect(r.answer.rejected).toEqual([
        { index: 0, reason: "no known field: send temperature, humidity, lux or battery" },
      ]);
      r = await ingest(sensor, `[${"[".repeat(depth)}${"]".repeat(depth)}]`);
      expect(r.answer.rejected?.[0].reason).toBe("not a JSON object");
      r = await ingest(
        sensor,
        `{"readings":[{"time":"${at}","temperature":{"v":${"[".repeat(100_000)}${"]".repeat(100_000)}}}]}`,
      );
      expect(r.answer.rejected?.[0].reason).toMatch(/temperature: not a number/);

      expect((await ingest(sensor, new Uint8Array([0xff, 0xfe, 0x00, 0x7b, 0x80]))).status).toBe(400);
      expect((await ingest(sensor, "")).status).toBe(400);
      expect((await ingest(sensor, "\uFEFF" + JSON.stringify({ time: at, temperature: 20 }))).answer.stored).toBe(1);
      r = await ingest(
        sensor,
        `{"readings":[{"time":"${at}","temperature":1e309},{"time":"${at}","humidity":1e308},{"time":"${at}","temperature":"NaN"}]}`,
      );
      expect(r.answer.rejected!.map((x) => x.reason)).toEqual([
        "temperature: not a number",
        expect.stringMatching(/humidity: .* outside 0–100 %/),
        "temperature: not a number",
      ]);
      // A batch mixing good and bad readings: the good ones are stored, each bad one named.
      r = await ingest(
        sensor,
        JSON.stringify([
          { time: at, temperature: "21" },
          { time: "30/02/2026 10:00", temperature: 21 },
          { time: "2026-02-30T10:00:00Z", temperature: 21 },
        ]),
      );
      expect(r.answer.rejected!.map((x) => x.index)).toEqual([1, 2]);

      // 10 MB: over MAX_HTTP_BYTES, refused whole, with or without a Content-Length.
      const big = JSON.stringify({
        readings: Array.from({ length: 200_000 }, (_v, i) => ({
          time: new Date(NOW - 86_400_000 + i * 1000).toISOString(),
          temperature: 20,
        })),
      });
      expect(big.length).toBeGreaterThan(10 * 1024 * 1024);
      expect((await ingest(sensor, big, { "Content-Length": String(big.length) })).status).toBe(413);
      expect((await ingest(sensor, big)).status).toBe(413);
      // More readings than MAX_HTTP_BATCH in under MAX_HTTP_BYTES: refused whole.
      const many = JSON.stringify(Array.from({ length: MAX_HTTP_BATCH + 1 }, () => ({ temperature: 20 })));
      expect(many.length).toBeLessThan(MAX_HTTP_BYTES);
      r = await ingest(sensor, many);
      expect(r.status).toBe(413);
      expect(r.answer.error).toMatch(/At most 10000 readings/);
    },
  );

  it("stops reading a body at the limit instead of buffering all of it", async () => {
    const sensor = await sensorInSpot();
    let pulled = 0;
    const chunk = new Uint8Array(64 * 1024).fill(0x20);
    const endless = new ReadableStream<Uint8Array>({
      pull(controller) {
        pulled += chunk.byteLength;
        if (pulled > 50 * 1024 * 1024)
          controller.close(); // a bound, in case the limit is not applied
        else controller.enqueue(chunk);
      },
    });
    const res = await post(sensor, endless);
    expect(res.status).toBe(413);
    expect(pulled).toBeLessThanOrEqual(MAX_HTTP_BYTES + 4 * chunk.byteLength);
  });
});

describe("CSV import under bad input", () => {
  const mapping = (headers: string[], over: Partial<CsvMapping> = {}): CsvMapping => ({
    ...guessMapping(headers),
    dateFormat: "iso",
    timeZone: "Europe/London",
    ...over,
  });

  /** Parses and imports; nothing may throw except the size/row limit error, and rows written match the answer. */
  async function csv(sensorId: number, bytes: Uint8Array, over: Partial<CsvMapping> = {}) {
    let parsed: ReturnType<typeof parseCsv>;
    try {
      parsed = parseCsv(bytes);
    } catch (err) {
      // The import page answers a parser error with its message (400); only say what the error is.
      expect(err).toBeInstanceOf(Error);
      expect((err as Error).message).toMatch(/\S/);
      return null;
    }
    const m = mapping(parsed.headers, over);
    const before = await counts(sensorId);
    const result = await importCsv(parsed.rows, m, sensorId);
    const after = await counts(sensorId);
    expect(result.valid + result.failed).toBe(parsed.rows.length);
    expect(after.rows - before.rows).toBe(result.stored);
    for (const f of result.firstFailures) expect(f.reason).toMatch(/\S/);
    return result;
  }

  const enc = (s: string) => new TextEncoder().encode(s);
  const cell = fc.oneof(
    fc.string({ maxLength: 12 }),
    fc.double().map(String),
    fc.constantFrom(
      "NaN",
      "1e309",
      "-",
      "n/a",
      '"',
      '""',
      "21,5",
      "2026-02-30 10:00",
      "31/12/2025 23:59",
      "1781521200",
      "12/31/25 11:59 pm",
      "\u0000",
    ),
    fc
      .integer({ min: NOW - 60 * 86_400_000, max: NOW })
      .map((ms) => new Date(ms).toISOString().replace("T", " ").slice(0, 19)),
  );
  const eol = fc.constantFrom("\n", "\r\n", "\r");

  it("random files with mixed line endings, quotes, delimiters and BOMs", { timeout: 120_000 }, async () => {
    const sensor = await sensorInSpot();
    await fc.assert(
      fc.asyncProperty(
        fc.boolean(),
        fc.constantFrom(",", ";", "\t"),
        fc.array(fc.tuple(fc.array(cell, { minLength: 1, maxLength: 5 }), eol), { maxLength: 30 }),
        fc.constantFrom(...DATE_FORMATS),
        async (bom, delim, lines, dateFormat) => {
          const text =
            (bom ? "\uFEFF" : "") +
            "time,temperature,humidity\n" +
            lines.map(([cells, end]) => cells.join(delim) + end).join("");
          await csv(sensor.id, enc(text), { dateFormat });
        },
      ),
      { numRuns: 120 },
    );
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 2000 }), async (bytes) => {
        await csv(sensor.id, bytes);
      }),
      { numRuns: 120 },
    );
  });

  it("hand-picked nasties: BOM + mixed line endings, odd dates, huge numbers, binary, Latin-1", async () => {
    const sensor = await sensorInSpot();
    const day = new Date(NOW - 2 * 86_400_000).toISOString().slice(0, 10);
    const [y, mo, d] = day.split("-");
    const text =
      "\uFEFFTimestamp;Temperature °C;RH %\r\n" +
      `${day} 10:00;21,5;55\n` +
      `${day} 10:01;1e309;55\r` +
      `${day} 10:02;NaN;55\r\n` +
      `${d}/${mo}/${y} 10:03;21;55\n` + // day-first in an ISO file: refused
      `${day} 25:00;21;55\n` +
      `${y}-02-30 10:00;21;55\n` +
      `${day} 10:04;99999999999999999999;55\n` +
      `${day} 10:05;-;n/a\n` +
      `${day} 10:06;"21.7";"56"\n`;
    const r = await csv(sensor.id, enc(text));
    expect(r).not.toBeNull();
    expect(r!.stored).toBe(2);
    expect(r!.firstFailures.map((f) => f.reason)).toEqual([
      "temperature: not a number",
      "temperature: not a number",
      expect.stringMatching(/not in the chosen format/),
      expect.stringMatching(/not in the chosen format/),
      expect.stringMatching(/not in the chosen format/),
      expect.stringMatching(/temperature: .* outside/),
      "no known field: send temperature, humidity, lux or battery",
    ]);
    // Binary and Latin-1 bytes: read or refused, never a crash.
    await csv(sensor.id, new Uint8Array([0x00, 0xff, 0x0a, 0xfe, 0x2c, 0x0d]));
    await csv(sensor.id, new Uint8Array([...enc("time,temp\n"), ...enc(`${day} 11:00,`), 0xb0, ...enc("21\n")]));
    // Quotes that never close.
    await csv(sensor.id, enc(`time,temperature\n"${day} 12:00,21\n${day} 12:01,"22\n`));
  });

  it("refuses files over the size or row limit before parsing them, and writes nothing", async () => {
    const sensor = await sensorInSpot();
    const before = await counts(sensor.id);
    // An unclosed quote at the start: a parser reading it would fail with a CSV error, not the limit.
    const tooBig = new Uint8Array(CSV_MAX_BYTES + 1).fill(0x41);
    tooBig[0] = 0x22;
    expect(() => parseCsv(tooBig)).toThrow(CsvLimitError);
    expect(() => parseCsv(tooBig)).toThrow(/over 20 MB/);
    const tooManyRows = new Uint8Array(CSV_MAX_ROWS + 3).fill(0x0a);
    tooManyRows[0] = 0x22;
    expect(() => parseCsv(tooManyRows)).toThrow(CsvLimitError);
    expect(() => parseCsv(tooManyRows)).toThrow(/over 1,000,000 rows/);
    expect(await counts(sensor.id)).toEqual(before);
    // Just at the row limit is allowed through to the parser.
    const atLimit = enc("time,temperature\n" + "\n".repeat(CSV_MAX_ROWS));
    expect(parseCsv(atLimit).rows).toEqual([]);
    // A preview converts at most the rows it shows.
    const rows = Array.from({ length: 1000 }, () => ["2026-01-01 00:00", "21"]);
    const preview = await convertRows(rows, mapping(["time", "temperature"]), sensor.id, 200);
    expect(preview.ok.length + preview.failed.length).toBe(200);
  });
});
