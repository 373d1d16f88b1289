// The in-memory rollup cache behind season profiles must never serve stale hours.
import { describe, expect, it } from "vitest";
import { ReadingWriter } from "~/.server/ingest/writer";
import { rebuildRollups } from "~/.server/ingest/rollups";
import { fetchRollups, loadRollups } from "~/.server/profiles";
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
      sensorId: sensor.id, measuredAt: new Date(start + k * 10 * 60_000), temperature: 15 + (k % 12) / 2, humidity: 60, lux: null, battery: null,
    }));
    await w.write(rows);
    const from = new Date(now - 4 * 24 * HOUR);
    const to = new Date(now);
    const same = async () => expect((await loadRollups([spot.id], from, to)).get(spot.id)).toEqual((await fetchRollups([spot.id], from, to)).get(spot.id));
    await same();
    await same(); // served from the cache
    // A late reading two days ago (a logger catching up) changes an old hour.
    await w.write([{ sensorId: sensor.id, measuredAt: new Date(start + 24 * HOUR + 7_000), temperature: -3, humidity: 90, lux: null, battery: null }]);
    await same();
    // A calibration change rebuilds the spot: counts stay, values move.
    await pool().query(`UPDATE sensors SET calibration = '{"temperature": 0.5}' WHERE id = $1`, [sensor.id]);
    await rebuildRollups([spot.id]);
    await same();
  });
});
