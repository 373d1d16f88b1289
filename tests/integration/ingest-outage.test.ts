// PostgreSQL dies while a sensor streams QoS 1 readings. The promise under test (BRIEF, reliability):
// ingest stops acknowledging, the sensor resends, and after the database is back every reading is
// stored exactly once. MQTT 3.1.1 §4.3.2: QoS 1 is at-least-once, a PUBACK hands over ownership.
import { connect, type MqttClient } from "mqtt";
import { afterAll, beforeAll, expect, inject, it } from "vitest";
import { pool } from "~/.server/db";
import { startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { ReadingWriter } from "~/.server/ingest/writer";
import { embeddedPid, startEmbeddedPostgres } from "~/.server/postgres";
import { freshRollups, makeSensor, makeSite, makeSpot, makeUser, storedRollups } from "./helpers";

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

let broker: RunningBroker;
let writer: ReadingWriter;
let client: MqttClient | undefined;

beforeAll(async () => {
  writer = new ReadingWriter();
  broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer, log: () => {} });
});

afterAll(async () => {
  await client?.endAsync(true).catch(() => {});
  await broker?.close();
});

function isAlive(pid: number) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/** Starts the cluster again; retries while the killed server's backends still hold shared memory. */
async function restartPostgres(dataDir: string, port: number) {
  const until = Date.now() + 60_000;
  for (;;) {
    try {
      await startEmbeddedPostgres({ dataDir, port, database: "nichewise_test", log: () => {} });
      return;
    } catch (err) {
      if (Date.now() > until) throw err;
      await sleep(500);
    }
  }
}

it("loses nothing and stores nothing twice when PostgreSQL is killed mid-stream", { timeout: 180_000 }, async () => {
  const user = await makeUser();
  const site = await makeSite(user);
  const spot = await makeSpot(site);
  const sensor = await makeSensor(site, spot);

  client = connect(`mqtt://127.0.0.1:${broker.port}`, {
    protocolVersion: 4,
    username: String(sensor.id),
    password: sensor.secret,
    clientId: `outage-${sensor.id}`,
    reconnectPeriod: 250,
    connectTimeout: 5000,
  });
  let reconnects = 0;
  client.on("reconnect", () => reconnects++);
  client.on("error", () => {});
  await new Promise<void>((resolve) => client!.once("connect", () => resolve()));

  const N = 400;
  const base = Math.floor((Date.now() - 3_600_000) / 1000) * 1000;
  const acked = new Set<number>();
  let appRetries = 0;
  let published = 0;
  // MQTT.js resends its own un-acked messages on reconnect, but a publish queued while it is still
  // resending fails with "Connection closed" if the link drops again; the sensor's code then sends
  // it again, as any QoS 1 sender must when told a publish failed.
  const publishOne = (i: number) => {
    const payload = JSON.stringify({
      time: new Date(base + i * 1000).toISOString(),
      temperature: 15 + (i % 40) / 4,
      humidity: 50 + (i % 30),
    });
    client!.publish(`nichewise/sensors/${sensor.id}/reading`, payload, { qos: 1 }, (err) => {
      if (!err) return void acked.add(i);
      appRetries++;
      setTimeout(() => publishOne(i), 200);
    });
  };
  const publisher = (async () => {
    for (let i = 0; i < N; i++) {
      publishOne(i);
      published++;
      await sleep(15);
    }
  })();

  await sleep(1500);
  const dataDir = inject("pgDataDir");
  const pid = embeddedPid(dataDir);
  expect(pid, "postmaster.pid of the test cluster").toBeTruthy();
  const ackedBeforeKill = acked.size;
  process.kill(pid!, "SIGKILL");
  const killedAt = Date.now();
  while (isAlive(pid!) && Date.now() - killedAt < 5000) await sleep(20);
  await sleep(2000);
  const ackedDuringOutage = acked.size;
  await restartPostgres(dataDir, inject("pgPort"));
  const restartedAt = Date.now();
  await publisher;

  const until = Date.now() + 120_000;
  while (acked.size < N && Date.now() < until) await sleep(100);
  const recoveredMs = Date.now() - restartedAt;
  await writer.drain();

  console.log(
    `[outage] acked before kill ${ackedBeforeKill}, at restart ${ackedDuringOutage}, all ${acked.size}/${N} ` +
      `${recoveredMs} ms after restart; reconnects ${reconnects}; ` +
      `write failures ${broker.stats.writeFailures}; publishes the app had to repeat ${appRetries}`,
  );
  expect(acked.size).toBe(N);
  expect(published).toBe(N);
  // The outage really hit the ingest path: writes failed and the client had to reconnect.
  expect(broker.stats.writeFailures).toBeGreaterThan(0);
  expect(reconnects).toBeGreaterThan(0);

  const res = await pool().query<{ n: number; distinct: number; first: Date; last: Date }>(
    `SELECT count(*)::int AS n, count(DISTINCT measured_at)::int AS distinct, min(measured_at) AS first, max(measured_at) AS last
     FROM readings WHERE sensor_id = $1`,
    [sensor.id],
  );
  expect(res.rows[0]).toMatchObject({ n: N, distinct: N });
  expect(res.rows[0].first.getTime()).toBe(base);
  expect(res.rows[0].last.getTime()).toBe(base + (N - 1) * 1000);
  // A batch that committed but whose ack never reached the sensor is resent; the rollups must not count it twice.
  const stored = await storedRollups(spot.id);
  expect(stored.reduce((s, r) => s + r.n, 0)).toBe(N);
  const fresh = await freshRollups(spot.id);
  expect(stored.map((r) => [new Date(r.hour).toISOString(), r.n, r.hn])).toEqual(
    fresh.map((r) => [new Date(r.hour).toISOString(), r.n, r.hn]),
  );
  stored.forEach((s, i) => expect(Math.abs(s.tsum - fresh[i].tsum)).toBeLessThan(1e-3));

  // Ingest carries on normally afterwards.
  await client.publishAsync(
    `nichewise/sensors/${sensor.id}/reading`,
    JSON.stringify({ time: new Date(base + N * 1000).toISOString(), temperature: 20 }),
    { qos: 1 },
  );
  const after = await pool().query<{ n: number }>("SELECT count(*)::int AS n FROM readings WHERE sensor_id = $1", [
    sensor.id,
  ]);
  expect(after.rows[0].n).toBe(N + 1);
});

it(
  "keeps a sensor able to sign in through an outage longer than the broker's sensor cache",
  { timeout: 180_000 },
  async () => {
    const user = await makeUser();
    const site = await makeSite(user);
    const spot = await makeSpot(site);
    const sensor = await makeSensor(site, spot);
    const c = connect(`mqtt://127.0.0.1:${broker.port}`, {
      protocolVersion: 4,
      username: String(sensor.id),
      password: sensor.secret,
      clientId: `outage-long-${sensor.id}`,
      reconnectPeriod: 500,
      connectTimeout: 5000,
    });
    const refusals: number[] = [];
    c.on("error", (e: Error & { code?: number }) => {
      if (typeof e.code === "number") refusals.push(e.code);
    });
    try {
      await new Promise<void>((resolve) => c.once("connect", () => resolve()));
      const t0 = Math.floor((Date.now() - 600_000) / 1000) * 1000;
      const topic = `nichewise/sensors/${sensor.id}/reading`;
      await c.publishAsync(topic, JSON.stringify({ time: new Date(t0).toISOString(), temperature: 18 }), { qos: 1 });

      const dataDir = inject("pgDataDir");
      const pid = embeddedPid(dataDir)!;
      process.kill(pid, "SIGKILL");
      while (isAlive(pid)) await sleep(20);
      // Past the broker's 10 s sensor cache, so a reconnect cannot be checked against the database.
      await sleep(11_000);
      let acked = false;
      c.publish(
        topic,
        JSON.stringify({ time: new Date(t0 + 1000).toISOString(), temperature: 19 }),
        { qos: 1 },
        (err) => {
          if (!err) acked = true;
        },
      );
      await sleep(3000);
      expect(acked).toBe(false); // nothing is acknowledged while the database is away
      await restartPostgres(dataDir, inject("pgPort"));
      const until = Date.now() + 60_000;
      while (!acked && Date.now() < until) await sleep(100);
      // A refused CONNACK would have stopped MQTT.js from reconnecting at all (its default).
      expect(refusals).toEqual([]);
      expect(acked).toBe(true);
      const res = await pool().query<{ n: number }>("SELECT count(*)::int AS n FROM readings WHERE sensor_id = $1", [
        sensor.id,
      ]);
      expect(res.rows[0].n).toBe(2);
      expect((await storedRollups(spot.id)).reduce((s, r) => s + r.n, 0)).toBe(2);
    } finally {
      await c.endAsync(true).catch(() => {});
    }
  },
);
