// Where a sensor was when: a new sensor's placement covers its stored history, placements can be
// corrected (start moved, split, readings outside every spot assigned), and each change commits in
// one transaction with its audit row and the rebuild of every spot it touches.
import { describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import {
  assignUnplaced,
  movePlacementStart,
  placeFromForm,
  placeSensor,
  removeSensorFromSpot,
  sensorsWithUnplaced,
  splitPlacement,
  unplacedReadings,
} from "~/.server/placements";
import { createSensor, deleteSensor, PlacementError, saveSensor } from "~/.server/sensors.server";
import type { Reading } from "~/domain/ingest/payload";
import { freshRollups, makeSensor, makeSite, makeSpot, makeUser, storedRollups } from "./helpers";

const MIN = 60_000;
const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const sumN = (rows: { n: number }[]) => rows.reduce((s, r) => s + r.n, 0);

/** Hourly readings from `from` on: a logger's stored data. */
const hourly = (sensorId: number, from: number, hours: number): Reading[] =>
  Array.from({ length: hours }, (_, i) => ({
    sensorId,
    measuredAt: new Date(from + i * HOUR),
    temperature: 10 + (i % 24) / 2,
    humidity: 60,
    lux: null,
    battery: null,
  }));

async function expectRollupsTrue(spotId: number) {
  const stored = await storedRollups(spotId);
  const fresh = await freshRollups(spotId);
  expect(stored.map((r) => [new Date(r.hour).toISOString(), r.n])).toEqual(
    fresh.map((r) => [new Date(r.hour).toISOString(), r.n]),
  );
  return sumN(stored);
}

const auditActions = async (siteId: number) =>
  (
    await pool().query<{ action: string }>("SELECT action FROM audit_log WHERE site_id = $1 ORDER BY id", [siteId])
  ).rows.map((r) => r.action);

async function household() {
  const user = await makeUser();
  const site = await makeSite(user);
  const a = await makeSpot(site, { name: "Sill" });
  const b = await makeSpot(site, { name: "Shelf" });
  return { user, site, a, b, w: new ReadingWriter() };
}

describe("a new sensor's placement", () => {
  it("covers a logger's past year by default: the readings are in the spot and none are outside it", async () => {
    const { user, site, a, w } = await household();
    const { id } = await createSensor({
      siteId: site.id,
      name: "Logger",
      channels: ["temperature", "humidity"],
      spotId: a.id,
      actorId: user.id,
    });
    const yearAgo = Math.floor((Date.now() - 400 * DAY) / HOUR) * HOUR;
    const past = hourly(id, yearAgo, 24 * 30);
    await w.write(past);
    expect(await expectRollupsTrue(a.id)).toBe(past.length);
    expect(await unplacedReadings(id)).toEqual([]);
    expect(await auditActions(site.id)).toEqual(["sensor.create", "sensor.place"]);
  });

  it("placed 'from now', earlier readings are counted outside every spot and can be put into one", async () => {
    const { user, site, a, w } = await household();
    const { id } = await createSensor({
      siteId: site.id,
      name: "Buffer",
      channels: ["temperature"],
      spotId: a.id,
      since: "now",
      actorId: user.id,
    });
    const past = hourly(id, Math.floor((Date.now() - 10 * DAY) / HOUR) * HOUR, 48);
    await w.write(past);
    expect(await expectRollupsTrue(a.id)).toBe(0);
    const [stretch, ...more] = await unplacedReadings(id);
    expect(more).toEqual([]);
    expect(stretch).toMatchObject({ from: null, count: 48, first: past[0].measuredAt, last: past[47].measuredAt });

    // Moving it "earlier" is still refused (it was already placed after that time), and says where to go.
    await expect(
      placeSensor({ siteId: site.id, sensorId: id, spotId: a.id, at: past[0].measuredAt, actorId: user.id }),
    ).rejects.toThrow(/edit its placements/);

    expect(await sensorsWithUnplaced(site.id)).toEqual(new Set([id]));

    await assignUnplaced({
      siteId: site.id,
      sensorId: id,
      gap: { from: stretch.from, to: stretch.to },
      spotId: a.id,
      actorId: user.id,
    });
    expect(await unplacedReadings(id)).toEqual([]);
    expect(await sensorsWithUnplaced(site.id)).toEqual(new Set());
    expect(await expectRollupsTrue(a.id)).toBe(48);
    // The same spot's placement was extended back, not doubled.
    const rows = (await pool().query("SELECT spot_id FROM placements WHERE sensor_id = $1", [id])).rows;
    expect(rows).toHaveLength(1);
    expect((await auditActions(site.id)).at(-1)).toBe("placement.assign");
  });
});

describe("editing placements", () => {
  it("moves a start earlier and splits a placement into two spots, rebuilding both spots", async () => {
    const { user, site, a, b, w } = await household();
    const start = Math.floor((Date.now() - 20 * DAY) / HOUR) * HOUR;
    const sensor = await makeSensor(site, a, new Date(start + 5 * DAY)); // placed five days too late
    const data = hourly(sensor.id, start, 24 * 10);
    await w.write(data);
    expect(await expectRollupsTrue(a.id)).toBe(24 * 5);
    const [placement] = (
      await pool().query<{ id: number }>("SELECT id FROM placements WHERE sensor_id = $1", [sensor.id])
    ).rows;

    await movePlacementStart({
      siteId: site.id,
      sensorId: sensor.id,
      placementId: placement.id,
      fromAt: new Date(start),
      actorId: user.id,
    });
    expect(await expectRollupsTrue(a.id)).toBe(24 * 10);

    // It went to the shelf on day 3 at 12:30: later hours move with it, the split hour is shared.
    const at = new Date(start + 3 * DAY + 12 * HOUR + 30 * MIN);
    await splitPlacement({
      siteId: site.id,
      sensorId: sensor.id,
      placementId: placement.id,
      at,
      spotId: b.id,
      actorId: user.id,
    });
    const before = data.filter((r) => r.measuredAt < at).length;
    expect(await expectRollupsTrue(a.id)).toBe(before);
    expect(await expectRollupsTrue(b.id)).toBe(data.length - before);
    expect(await unplacedReadings(sensor.id)).toEqual([]);

    // The start of the shelf's part may not reach back into the sill's.
    const shelf = (
      await pool().query<{ id: number }>("SELECT id FROM placements WHERE sensor_id = $1 AND spot_id = $2", [
        sensor.id,
        b.id,
      ])
    ).rows[0];
    await expect(
      movePlacementStart({
        siteId: site.id,
        sensorId: sensor.id,
        placementId: shelf.id,
        fromAt: new Date(start + DAY),
        actorId: user.id,
      }),
    ).rejects.toThrow(PlacementError);
    expect(await auditActions(site.id)).toEqual(["placement.move-start", "placement.split"]);
  });

  it("puts readings sent after the sensor was taken out into a spot, up to now", async () => {
    const { user, site, a, b, w } = await household();
    const start = Math.floor((Date.now() - 6 * DAY) / HOUR) * HOUR;
    const sensor = await makeSensor(site, a, new Date(start));
    await removeSensorFromSpot({
      siteId: site.id,
      sensorId: sensor.id,
      at: new Date(start + 2 * DAY),
      actorId: user.id,
    });
    await w.write(hourly(sensor.id, start, 24 * 4));
    const [after] = await unplacedReadings(sensor.id);
    expect(after).toMatchObject({ count: 48, to: null });
    await assignUnplaced({
      siteId: site.id,
      sensorId: sensor.id,
      gap: { from: after.from, to: after.to },
      spotId: b.id,
      actorId: user.id,
    });
    expect(await expectRollupsTrue(a.id)).toBe(48);
    expect(await expectRollupsTrue(b.id)).toBe(48);
    expect(await unplacedReadings(sensor.id)).toEqual([]);
    // A stale form (the stretch changed meanwhile) changes nothing.
    await expect(
      assignUnplaced({ siteId: site.id, sensorId: sensor.id, gap: after, spotId: a.id, actorId: user.id }),
    ).rejects.toThrow(/changed meanwhile/);
  });

  it("a refused change leaves no trace: no placement, no audit row, no rebuild", async () => {
    const { user, site, a, w } = await household();
    const other = await makeSite(user);
    const foreign = await makeSpot(other);
    const start = Math.floor((Date.now() - 3 * DAY) / HOUR) * HOUR;
    const sensor = await makeSensor(site, a, new Date(start));
    await w.write(hourly(sensor.id, start, 48));
    const [p] = (await pool().query<{ id: number }>("SELECT id FROM placements WHERE sensor_id = $1", [sensor.id]))
      .rows;
    await expect(
      splitPlacement({
        siteId: site.id,
        sensorId: sensor.id,
        placementId: p.id,
        at: new Date(start + DAY),
        spotId: foreign.id,
        actorId: user.id,
      }),
    ).rejects.toThrow(PlacementError);
    expect((await pool().query("SELECT * FROM placements WHERE sensor_id = $1", [sensor.id])).rows).toHaveLength(1);
    expect(await auditActions(site.id)).toEqual([]);
    expect(await expectRollupsTrue(a.id)).toBe(48);
  });
});

describe("the place-sensor form, one action for the sensor's and the spot's page", () => {
  it("places from either page, since the first reading for a never-placed sensor", async () => {
    const { user, site, a, b, w } = await household();
    const { id } = await createSensor({ siteId: site.id, name: "Loose", channels: ["temperature"], actorId: user.id });
    await w.write(hourly(id, Math.floor((Date.now() - 2 * DAY) / HOUR) * HOUR, 24));
    expect((await unplacedReadings(id))[0].count).toBe(24);
    const form = (fields: Record<string, string>) => {
      const f = new FormData();
      for (const [k, v] of Object.entries(fields)) f.set(k, v);
      return f;
    };
    const who = { siteId: site.id, timeZone: site.timeZone, actorId: user.id };
    expect(
      await placeFromForm(form({ intent: "place", spotId: String(a.id), when: "first" }), { ...who, sensorId: id }),
    ).toEqual({ placed: true });
    expect(await expectRollupsTrue(a.id)).toBe(24);
    expect(await placeFromForm(form({ intent: "place", sensorId: String(id) }), { ...who, spotId: b.id })).toEqual({
      placed: true,
    });
    expect(await placeFromForm(form({ intent: "place", sensorId: String(id) }), { ...who, spotId: b.id })).toEqual({
      placeError: "The sensor is already in that spot.",
    });
    expect(
      await placeFromForm(form({ intent: "place", spotId: String(a.id), when: "earlier", at: "nonsense" }), {
        ...who,
        sensorId: id,
      }),
    ).toEqual({
      placeError: "Enter the date and time it was moved.",
    });
  });
});

describe("saving and deleting a sensor", () => {
  it("a calibration change and a delete each rebuild the spots in the same transaction as the audit row", async () => {
    const { user, site, a, w } = await household();
    const start = Math.floor((Date.now() - 2 * DAY) / HOUR) * HOUR;
    const sensor = await makeSensor(site, a, new Date(start));
    await w.write(hourly(sensor.id, start, 24));
    await saveSensor({
      siteId: site.id,
      sensorId: sensor.id,
      name: "Renamed",
      calibration: { temperature: 1.5 },
      actorId: user.id,
    });
    const stored = await storedRollups(a.id);
    expect(stored[0].tmin).toBeCloseTo(11.5, 3);
    await expectRollupsTrue(a.id);
    await deleteSensor({ siteId: site.id, sensorId: sensor.id, name: "Renamed", actorId: user.id });
    expect(await storedRollups(a.id)).toEqual([]);
    expect(
      (await pool().query("SELECT count(*)::int AS n FROM readings WHERE sensor_id = $1", [sensor.id])).rows[0].n,
    ).toBe(0);
    expect(await auditActions(site.id)).toEqual(["sensor.update", "sensor.delete"]);
  });
});
