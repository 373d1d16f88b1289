// Hobby firmwares often publish each channel on its own topic, one after another, within the same
// second. Both values must end up in one reading, and each counted once in the rollup.
import { connectAsync } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { ReadingWriter } from "~/.server/ingest/writer";
import { freshRollups, makeSensor, makeSite, makeSpot, makeUser, storedRollups } from "./helpers";

let broker: RunningBroker;
beforeAll(async () => {
  broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer: new ReadingWriter(), log: () => {} });
});
afterAll(async () => broker?.close());

describe("per-channel topics", () => {
  it("merges a temperature and a humidity sent in the same second into one row, counted once each", async () => {
    const user = await makeUser();
    const site = await makeSite(user);
    const spot = await makeSpot(site);
    const sensor = await makeSensor(site, spot);
    const c = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
      protocolVersion: 4,
      username: String(sensor.id),
      password: sensor.secret,
      reconnectPeriod: 0,
    });
    const base = `nichewise/sensors/${sensor.id}`;
    // Three rounds; in each, temperature then humidity then a repeat of the temperature.
    for (let i = 0; i < 3; i++) {
      await c.publishAsync(`${base}/temperature`, String(20 + i), { qos: 1 });
      await c.publishAsync(`${base}/humidity`, String(50 + i), { qos: 1 });
      await c.publishAsync(`${base}/temperature`, String(20 + i), { qos: 1 });
      await new Promise((r) => setTimeout(r, 1100));
    }
    await c.endAsync();
    const rows = await pool().query(
      "SELECT temperature, humidity FROM readings WHERE sensor_id = $1 ORDER BY measured_at",
      [sensor.id],
    );
    // Rounds can straddle a second boundary; either way no value is lost and none is counted twice.
    expect(
      rows.rows
        .map((r) => r.temperature)
        .filter((t) => t != null)
        .sort(),
    ).toEqual(expect.arrayContaining([20, 21, 22]));
    expect(
      rows.rows
        .filter((r) => r.humidity != null)
        .map((r) => r.humidity)
        .sort(),
    ).toEqual([50, 51, 52]);
    const stored = await storedRollups(spot.id);
    const fresh = await freshRollups(spot.id);
    expect(stored.map((r) => [r.n, r.hn])).toEqual(fresh.map((r) => [r.n, r.hn]));
    expect(stored.reduce((s, r) => s + Number(r.hsum), 0)).toBeCloseTo(153, 3);
  });
});
