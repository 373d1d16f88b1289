// Exports stream from PostgreSQL: a year of one-minute readings exported as CSV and JSON equals the
// stored rows, row for row, and arrives in many chunks (never built whole in memory).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import {
  EXPORT_BATCH,
  exportProfile,
  exportReadings,
  HOURLY_COLUMNS,
  parsePeriod,
  RAW_COLUMNS,
} from "~/.server/exports";
import { ReadingWriter } from "~/.server/ingest/writer";
import type { Site, Spot } from "~/db/schema.server";
import { makeSensor, makeSite, makeSpot, makeUser, storedRollups } from "./helpers";

async function* lines(stream: ReadableStream<Uint8Array>, counter: { chunks: number }) {
  const decoder = new TextDecoder();
  let rest = "";
  for await (const chunk of stream as unknown as AsyncIterable<Uint8Array>) {
    counter.chunks++;
    rest += decoder.decode(chunk, { stream: true });
    const parts = rest.split("\r\n");
    rest = parts.pop()!;
    yield* parts;
  }
  if (rest) yield rest;
}

const num = (s: string | null | undefined) => (s == null || s === "" ? null : Number(s));

describe("a year of one-minute readings", () => {
  let site: Site;
  let spot: Spot;
  let sensorId: number;
  const MINUTES = 365 * 24 * 60;
  let stored: unknown[][];

  beforeAll(async () => {
    const user = await makeUser();
    site = await makeSite(user, { timeZone: "Europe/London" });
    spot = await makeSpot(site);
    sensorId = (await makeSensor(site, spot)).id;
    await pool().query("SELECT ensure_reading_partitions('2025-01-01'::timestamptz, 13)");
    // Humidity missing every 97th minute and light only by day, so empty cells are exported too.
    await pool().query(
      `INSERT INTO readings (sensor_id, measured_at, temperature, humidity, lux, battery)
       SELECT $1, '2025-01-01T00:00:00Z'::timestamptz + n * interval '1 minute',
         (14 + 6 * sin(n / 700.0) + (n % 13) / 10.0)::real,
         CASE WHEN n % 97 = 0 THEN NULL ELSE (55 + 20 * cos(n / 1300.0))::real END,
         CASE WHEN (n / 60) % 24 BETWEEN 8 AND 17 THEN (n % 5000)::real ELSE NULL END,
         (100 - n / 10000.0)::real
       FROM generate_series(0, $2 - 1) AS n`,
      [sensorId, MINUTES],
    );
    const res = await pool().query({
      text: "SELECT measured_at, temperature, humidity, lux, battery FROM readings WHERE sensor_id = $1 ORDER BY measured_at",
      values: [sensorId],
      rowMode: "array",
    });
    stored = res.rows;
  }, 120_000);

  afterAll(async () => {
    await pool().query("DELETE FROM readings WHERE sensor_id = $1", [sensorId]);
  });

  const period = () => {
    const p = parsePeriod(new URLSearchParams({ from: "2025-01-01", to: "2025-12-31" }), "Europe/London");
    if ("error" in p) throw new Error(p.error);
    return p;
  };

  it("covers the whole year in the site's local dates", () => {
    const { from, to } = period();
    expect(from.toISOString()).toBe("2025-01-01T00:00:00.000Z");
    expect(to.toISOString()).toBe("2026-01-01T00:00:00.000Z");
  });

  it("CSV equals the stored rows, in many chunks", async () => {
    expect(stored).toHaveLength(MINUTES);
    const { from, to } = period();
    const counter = { chunks: 0 };
    let i = -1;
    let mismatches = 0;
    for await (const line of lines(exportReadings({ site, spot, kind: "raw", format: "csv", from, to }), counter)) {
      if (i === -1) {
        expect(line).toBe(RAW_COLUMNS.join(","));
        i++;
        continue;
      }
      const cells = line.split(",");
      const row = stored[i] as [Date, string | null, string | null, string | null, string | null];
      const same =
        cells[0] === row[0].toISOString() &&
        Number(cells[1]) === sensorId &&
        num(cells[2]) === num(row[1]) &&
        num(cells[3]) === num(row[2]) &&
        num(cells[4]) === num(row[3]) &&
        num(cells[5]) === num(row[4]);
      if (!same && mismatches++ < 3) console.error("mismatch", i, line, row);
      i++;
    }
    expect(mismatches).toBe(0);
    expect(i).toBe(MINUTES);
    expect(counter.chunks).toBeGreaterThan(MINUTES / EXPORT_BATCH);
  });

  it("JSON equals the stored rows", async () => {
    const { from, to } = period();
    let text = "";
    const decoder = new TextDecoder();
    for await (const chunk of exportReadings({
      site,
      spot,
      kind: "raw",
      format: "json",
      from,
      to,
    }) as unknown as AsyncIterable<Uint8Array>) {
      text += decoder.decode(chunk, { stream: true });
    }
    const doc = JSON.parse(text) as { meta: { spotId: number }; columns: string[]; rows: (string | number | null)[][] };
    expect(doc.meta.spotId).toBe(spot.id);
    expect(doc.columns).toEqual(RAW_COLUMNS);
    expect(doc.rows).toHaveLength(MINUTES);
    const bad = doc.rows.findIndex((r, i) => {
      const s = stored[i] as [Date, string | null, string | null, string | null, string | null];
      return (
        r[0] !== s[0].toISOString() ||
        num(r[2] as string) !== num(s[1]) ||
        num(r[3] as string) !== num(s[2]) ||
        num(r[4] as string) !== num(s[3])
      );
    });
    expect(bad).toBe(-1);
  });

  it("a period inside the year gives exactly its rows", async () => {
    const p = parsePeriod(new URLSearchParams({ from: "2025-07-01", to: "2025-07-01" }), "Europe/London");
    if ("error" in p) throw new Error(p.error);
    // 1 July in London is 23:00 UTC on 30 June to 23:00 UTC on 1 July (summer time).
    expect(p.from.toISOString()).toBe("2025-06-30T23:00:00.000Z");
    const counter = { chunks: 0 };
    const got: string[] = [];
    for await (const line of lines(
      exportReadings({ site, spot, kind: "raw", format: "csv", from: p.from, to: p.to }),
      counter,
    ))
      got.push(line);
    expect(got).toHaveLength(1 + 1440);
    expect(got[1].startsWith("2025-06-30T23:00:00.000Z,")).toBe(true);
    expect(got.at(-1)!.startsWith("2025-07-01T22:59:00.000Z,")).toBe(true);
  });
});

describe("hourly and profile exports", () => {
  it("hourly CSV equals the stored rollups; the profile covers the months", async () => {
    const user = await makeUser();
    const site = await makeSite(user);
    const spot = await makeSpot(site);
    const sensor = await makeSensor(site, spot);
    const writer = new ReadingWriter();
    const start = Date.parse("2025-03-01T00:00:00Z");
    const readings = Array.from({ length: 3 * 24 * 12 }, (_, i) => ({
      sensorId: sensor.id,
      measuredAt: new Date(start + i * 5 * 60_000),
      temperature: 12 + (i % 40) / 4,
      humidity: 60 + (i % 9),
      lux: null,
      battery: 90,
    }));
    await writer.write(readings);
    const from = new Date(start);
    const to = new Date(start + 3 * 86_400_000);
    const counter = { chunks: 0 };
    const got: string[] = [];
    for await (const line of lines(exportReadings({ site, spot, kind: "hourly", format: "csv", from, to }), counter))
      got.push(line);
    expect(got[0]).toBe(HOURLY_COLUMNS.join(","));
    const rollups = await storedRollups(spot.id);
    expect(got).toHaveLength(1 + rollups.length);
    rollups.forEach((r, i) => {
      const c = got[i + 1].split(",");
      expect(c[0]).toBe(new Date(r.hour).toISOString().replace(".000", ""));
      expect(Number(c[1])).toBe(r.n);
      // the export rounds the mean to 2 decimals
      expect(Math.abs(Number(c[2]) - r.tsum / r.n)).toBeLessThanOrEqual(0.005 + 1e-9);
      expect(Number(c[3])).toBe(Number(r.tmin));
      expect(Number(c[4])).toBe(Number(r.tmax));
    });

    let text = "";
    for await (const chunk of (await exportProfile({
      site,
      spot,
      format: "json",
      from,
      to,
    })) as unknown as AsyncIterable<Uint8Array>)
      text += new TextDecoder().decode(chunk);
    const profile = JSON.parse(text) as { months: { key: string; temperature: { lowest: number; highest: number } }[] };
    expect(profile.months.map((m) => m.key)).toEqual(["2025-03"]);
    expect(profile.months[0].temperature.lowest).toBeCloseTo(12, 5);
    expect(profile.months[0].temperature.highest).toBeCloseTo(21.75, 5);
  });

  it("refuses bad periods", () => {
    expect(parsePeriod(new URLSearchParams({ from: "2025-13-01x" }), "UTC")).toHaveProperty("error");
    expect(parsePeriod(new URLSearchParams({ from: "2025-05-02", to: "2025-05-01" }), "UTC")).toHaveProperty("error");
  });
});
