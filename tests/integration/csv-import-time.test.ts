// CSV import against the real database: naive local times across daylight saving, lines of the
// file, readings outside the sensor's placements, the audit row, bounded concurrency; and the
// hourly rollups' count of readings near the dew point.
import { afterAll, describe, expect, it } from "vitest";
import { db, pool } from "~/.server/db";
import { auditCsvImport, csvSlot, importCsv, previewCsv } from "~/.server/ingest/csv-import";
import { readCsvHead } from "~/.server/ingest/csv-file";
import { rebuildRollups } from "~/.server/rollups/rebuild";
import { ReadingWriter } from "~/.server/ingest/writer";
import { auditLog } from "~/db/schema.server";
import { guessMapping, type CsvMapping } from "~/domain/ingest/csv";
import { zoneClock } from "~/domain/season/local-time";
import { eq } from "drizzle-orm";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const MIN = 60_000;
const enc = (s: string) => new TextEncoder().encode(s);

async function setup(timeZone: string, placedFrom?: Date) {
  const user = await makeUser();
  const site = await makeSite(user, { timeZone });
  const spot = await makeSpot(site);
  const sensor = await makeSensor(site, spot, placedFrom);
  return { user, site, spot, sensor };
}

async function mappingFor(bytes: Uint8Array, timeZone: string): Promise<CsvMapping> {
  const head = await readCsvHead(bytes);
  return { ...guessMapping(head.headers), dateFormat: "iso", timeZone };
}

async function storedTimes(sensorId: number) {
  const { rows } = await pool().query<{ measured_at: Date }>(
    "SELECT measured_at FROM readings WHERE sensor_id = $1 ORDER BY measured_at",
    [sensorId],
  );
  return rows.map((r) => r.measured_at.getTime());
}

/** A logger that follows the local clock: every 10 minutes for six hours from `fromUtc`, as naive local times. */
function loggerFile(zone: string, fromUtc: number): { text: string; instants: number[] } {
  const clock = zoneClock(zone);
  const instants = Array.from({ length: 36 }, (_, k) => fromUtc + k * 10 * MIN);
  const lines = instants.map(
    (ms, k) =>
      `${new Date(ms + clock.offsetAt(ms)).toISOString().slice(0, 16).replace("T", " ")},${(18 + (k % 5) / 10).toFixed(1)},60`,
  );
  return { text: "Time,Temperature,Humidity\n" + lines.join("\n") + "\n", instants };
}

describe("CSV import of naive local times across daylight saving", () => {
  // EU summer time starts and ends at 01:00 UTC on the last Sundays of March and October
  // (Directive 2000/84/EC); New Zealand's on the last Sunday of September and first of April
  // (Time Act 1974, Daylight Time Order 2007); Adelaide keeps UTC+09:30, +10:30 in summer.
  for (const [zone, spring, autumn] of [
    ["Europe/Madrid", Date.UTC(2025, 2, 29, 22), Date.UTC(2025, 9, 25, 22)],
    ["Pacific/Auckland", Date.UTC(2025, 8, 27, 11), Date.UTC(2025, 3, 5, 11)],
    ["Australia/Adelaide", Date.UTC(2025, 9, 4, 13), Date.UTC(2025, 3, 5, 13)],
  ] as const) {
    it(`${zone}: a logger's six hours over each change are stored at the instants they were measured, none lost as "already stored"`, async () => {
      const { sensor } = await setup(zone);
      const springFile = loggerFile(zone, spring);
      const autumnFile = loggerFile(zone, autumn);
      const bytes = enc(springFile.text + autumnFile.text.split("\n").slice(1).join("\n"));
      const mapping = await mappingFor(bytes, zone);
      const preview = await previewCsv(bytes, mapping, sensor.id);
      expect(preview).toMatchObject({ rows: 72, valid: 72, failed: 0 });
      expect(preview.dstChanges.map((c) => c.kind).sort()).toEqual(["repeated"]);
      const result = await importCsv(bytes, mapping, sensor.id);
      expect(result).toMatchObject({ rows: 72, valid: 72, stored: 72, duplicates: 0, outsideSpots: 0 });
      expect(await storedTimes(sensor.id)).toEqual(
        [...springFile.instants, ...autumnFile.instants].sort((a, b) => a - b),
      );
    });
  }

  it("Europe/Madrid: the preview says how skipped and repeated rows were read", async () => {
    const { sensor } = await setup("Europe/Madrid");
    const text =
      "time,temperature\n" +
      ["2025-03-30 01:40", "2025-03-30 02:10", "2025-03-30 02:40", "2025-03-30 03:50"]
        .map((t) => `${t},12`)
        .join("\n") +
      "\n" +
      [
        "2025-10-26 01:30",
        "2025-10-26 02:00",
        "2025-10-26 02:30",
        "2025-10-26 02:00",
        "2025-10-26 02:30",
        "2025-10-26 03:00",
      ]
        .map((t) => `${t},14`)
        .join("\n");
    const bytes = enc(text);
    const preview = await previewCsv(bytes, await mappingFor(bytes, "Europe/Madrid"), sensor.id);
    expect(preview.dstChanges).toMatchObject([
      { date: "2025-03-30", kind: "skipped", rows: 2 },
      { date: "2025-10-26", kind: "repeated", rows: 4, first: 2, second: 2 },
    ]);
    await importCsv(bytes, await mappingFor(bytes, "Europe/Madrid"), sensor.id);
    expect((await storedTimes(sensor.id)).map((ms) => new Date(ms).toISOString().slice(0, 16))).toEqual([
      "2025-03-30T00:40", // 01:40 CET
      "2025-03-30T01:10", // 02:10 never happened: read as 03:10 CEST
      "2025-03-30T01:40", // 02:40 → 03:40 CEST
      "2025-03-30T01:50", // 03:50 CEST
      "2025-10-25T23:30", // 01:30 CEST
      "2025-10-26T00:00", // 02:00 CEST (first)
      "2025-10-26T00:30", // 02:30 CEST (first)
      "2025-10-26T01:00", // 02:00 CET (after the clock went back)
      "2025-10-26T01:30", // 02:30 CET
      "2025-10-26T02:00", // 03:00 CET
    ]);
  });
});

describe("CSV preview lines and placements", () => {
  it("numbers preview rows and failures by their line in the file, blank lines and bad rows included", async () => {
    const { sensor } = await setup("UTC");
    const bytes = enc("time,temperature\n\n2025-06-02 10:00,warm\n2025-06-02 10:10,21\r\n\n2025-06-02 10:20,22\n");
    const preview = await previewCsv(bytes, await mappingFor(bytes, "UTC"), sensor.id);
    expect(preview.firstFailures.map((f) => f.line)).toEqual([3]);
    expect(preview.sample.map((s) => s.line)).toEqual([4, 6]);
  });

  it("warns of rows before the sensor's placement, counts them in the import's answer, and audits the import", async () => {
    const { user, site, sensor } = await setup("UTC", new Date("2025-06-01T00:00:00Z"));
    const rows = Array.from(
      { length: 48 },
      (_, k) => `${new Date(Date.UTC(2025, 4, 31) + k * 60 * MIN).toISOString()},20`,
    );
    const bytes = enc("time,temperature\n" + rows.join("\n"));
    const mapping = await mappingFor(bytes, "UTC");
    const preview = await previewCsv(bytes, mapping, sensor.id);
    expect(preview).toMatchObject({ rows: 48, valid: 48, outsideSpots: 24, beforeFirstPlacement: 24 });
    expect(preview.earliestOutside!.toISOString()).toBe("2025-05-31T00:00:00.000Z");
    const result = await importCsv(bytes, mapping, sensor.id);
    expect(result).toMatchObject({ stored: 48, outsideSpots: 24 });
    await auditCsvImport({ siteId: site.id, actorId: user.id, sensorId: sensor.id, sensorName: sensor.name, result });
    const audit = await db().select().from(auditLog).where(eq(auditLog.siteId, site.id));
    expect(audit).toMatchObject([
      {
        action: "csv.import",
        actorId: user.id,
        detail: { sensorId: sensor.id, rows: 48, stored: 48, outsideSpots: 24 },
      },
    ]);
  });

  it("an import of a file that breaks off keeps the rows before the break and says where it stopped", async () => {
    const { sensor } = await setup("UTC");
    const bytes = enc(
      'time,temperature\n2025-06-02 10:00,21\n2025-06-02 10:10,22\n"2025-06-02 10:20,23\n2025-06-02 10:30,24\n',
    );
    await expect(previewCsv(bytes, await mappingFor(bytes, "UTC"), sensor.id)).rejects.toThrow(/quote/i);
    const result = await importCsv(bytes, await mappingFor(bytes, "UTC"), sensor.id);
    expect(result).toMatchObject({ stored: 2, stopped: { line: 4 } });
    expect(result.stopped!.reason).toMatch(/could not be read as CSV/);
    expect((await storedTimes(sensor.id)).length).toBe(2);
  });

  it("lets one preview or import run per user, two in all", () => {
    const a = csvSlot("user-a")!;
    expect(a).toBeTypeOf("function");
    expect(csvSlot("user-a")).toBeNull();
    const b = csvSlot("user-b")!;
    expect(csvSlot("user-c")).toBeNull();
    a();
    const c = csvSlot("user-c")!;
    expect(c).toBeTypeOf("function");
    b();
    c();
  });
});

describe("hourly rollups keep the share of readings near the dew point", () => {
  const w = new ReadingWriter();
  afterAll(() => w.drain());

  it("counts readings under the 2 °C margin per hour, in the writer and in a rebuild, a merged channel once", async () => {
    const { spot, sensor } = await setup("UTC");
    const hour = Date.UTC(2025, 0, 15, 3);
    // 10 °C at 90 % RH has a dew point of about 8.4 °C (margin 1.6 °C, Magnus formula, Alduchov &
    // Eskridge 1996); at 70 % about 4.8 °C (margin 5.2 °C). Three of six readings are near condensation.
    const readings = [90, 90, 90, 70, 70, 70].map((rh, k) => ({
      sensorId: sensor.id,
      measuredAt: new Date(hour + k * 10 * MIN),
      temperature: 10,
      humidity: rh,
      lux: null,
      battery: null,
    }));
    // The sixth arrives in two single-channel messages: counted once it has both.
    await w.write(readings.slice(0, 5));
    await w.write([{ ...readings[5], humidity: null, partial: true }]);
    await w.write([{ ...readings[5], temperature: null, partial: true }]);
    const read = async () =>
      (
        await pool().query("SELECT dp_n, dp_under_n FROM hourly_rollups WHERE spot_id = $1 AND hour = $2", [
          spot.id,
          new Date(hour),
        ])
      ).rows[0];
    expect(await read()).toEqual({ dp_n: 6, dp_under_n: 3 });
    await rebuildRollups([spot.id]);
    expect(await read()).toEqual({ dp_n: 6, dp_under_n: 3 });
  });
});
