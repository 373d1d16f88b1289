// The in-memory rollup cache behind season profiles must never serve stale hours.
import { describe, expect, it, vi } from "vitest";
import { ReadingWriter } from "~/.server/ingest/writer";
import { rebuildRollups } from "~/.server/rollups/rebuild";
import { fetchRollups, loadRollups, rollupCacheState } from "~/.server/rollups/read";
import { pool } from "~/.server/db";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const HOUR = 3_600_000;

describe("rollup cache", () => {
  it("serves the same rows as PostgreSQL after late readings and a calibration rebuild", async () => {
    const user = await makeUser();
    const site = await makeSite(user);
    const spot = await makeSpot(site);
    const sensor = await makeSensor(site, spot);
    const w = new ReadingWriter();
    const now = Date.now();
    const start = Math.floor((now - 3 * 24 * HOUR) / HOUR) * HOUR;
    const rows = Array.from({ length: 72 * 6 }, (_, k) => ({
      sensorId: sensor.id,
      measuredAt: new Date(start + k * 10 * 60_000),
      temperature: 15 + (k % 12) / 2,
      humidity: 60,
      lux: null,
      battery: null,
    }));
    await w.write(rows);
    const from = new Date(now - 4 * 24 * HOUR);
    const to = new Date(now);
    const same = async () =>
      expect((await loadRollups([spot.id], from, to)).get(spot.id)).toEqual(
        (await fetchRollups([spot.id], from, to)).get(spot.id),
      );
    await same();
    // Served from the cache: the second load finds the spot's rows there and reads none again.
    const before = rollupCacheState.counts();
    await same();
    const after = rollupCacheState.counts();
    expect(after.hits - before.hits).toBe(1);
    expect(after.read - before.read).toBe(0);
    // A late reading two days ago (a logger catching up) changes an old hour.
    await w.write([
      {
        sensorId: sensor.id,
        measuredAt: new Date(start + 24 * HOUR + 7_000),
        temperature: -3,
        humidity: 90,
        lux: null,
        battery: null,
      },
    ]);
    await same();
    // A calibration change rebuilds the spot: counts stay, values move.
    await pool().query(`UPDATE sensors SET calibration = '{"temperature": 0.5}' WHERE id = $1`, [sensor.id]);
    await rebuildRollups([spot.id]);
    await same();
    // Narrower periods are cut from the cached rows: a later start, a period ending in the past.
    const sameFor = async (f: Date, t: Date) =>
      expect((await loadRollups([spot.id], f, t)).get(spot.id)).toEqual(
        (await fetchRollups([spot.id], f, t)).get(spot.id),
      );
    await sameFor(new Date(from.getTime() + 30 * HOUR + 7 * 60_000), to);
    await sameFor(from, new Date(now - 30 * HOUR));
    await sameFor(new Date(start + 5 * HOUR), new Date(start + 9 * HOUR));
    // Three hours on, the hours that became past are read and appended to the cached ones.
    const later = now + 3 * HOUR;
    vi.useFakeTimers({ toFake: ["Date"], now: later });
    try {
      await w.write([
        {
          sensorId: sensor.id,
          measuredAt: new Date(now - 10 * 60_000),
          temperature: 30,
          humidity: 40,
          lux: null,
          battery: null,
        },
      ]);
      await sameFor(from, new Date(later));
      await sameFor(new Date(from.getTime() + 3 * HOUR), new Date(later));
    } finally {
      vi.useRealTimers();
    }
    // A rolling window six hours on: the appending read also drops the hours before its period,
    // so the cached rows don't grow with the server's uptime; an earlier period is read again.
    const rolled = now + 6 * HOUR;
    vi.useFakeTimers({ toFake: ["Date"], now: rolled });
    try {
      const rolledFrom = new Date(start + 6 * HOUR);
      await sameFor(rolledFrom, new Date(rolled));
      const cached = rollupCacheState.rows(spot.id)!;
      expect(cached[0].hour.getTime()).toBeGreaterThanOrEqual(rolledFrom.getTime());
      await sameFor(from, new Date(rolled));
    } finally {
      vi.useRealTimers();
    }
    // A deleted hour (readings removed and the spot rebuilt) is gone from the cache as well.
    await pool().query("DELETE FROM readings WHERE sensor_id = $1 AND measured_at < $2", [
      sensor.id,
      new Date(start + 24 * HOUR),
    ]);
    await rebuildRollups([spot.id]);
    await same();
  });

  it("logs only changes to hours more than an hour old", async () => {
    const user = await makeUser();
    const site = await makeSite(user);
    const spot = await makeSpot(site);
    const sensor = await makeSensor(site, spot);
    const w = new ReadingWriter();
    const logged = async () =>
      Number((await pool().query("SELECT count(*) FROM rollup_changes WHERE spot_id = $1", [spot.id])).rows[0].count);
    // A reading of the current hour (London's hours start on UTC's): "a minute ago" was
    // in the hour before during the first minute of each hour, and that hour is over an hour old.
    await w.write([
      {
        sensorId: sensor.id,
        measuredAt: new Date(Math.floor(Date.now() / HOUR) * HOUR),
        temperature: 20,
        humidity: 50,
        lux: null,
        battery: null,
      },
    ]);
    expect(await logged()).toBe(0);
    await w.write([
      {
        sensorId: sensor.id,
        measuredAt: new Date(Date.now() - 3 * HOUR),
        temperature: 20,
        humidity: 50,
        lux: null,
        battery: null,
      },
    ]);
    expect(await logged()).toBe(1);
    await w.write([
      {
        sensorId: sensor.id,
        measuredAt: new Date(Date.now() - 3 * HOUR + 1000),
        temperature: 21,
        humidity: 50,
        lux: null,
        battery: null,
      },
    ]);
    expect(await logged()).toBe(2); // the upsert's update
  });
});
