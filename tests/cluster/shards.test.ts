// Cluster mode's sharded stream against a real RabbitMQ node (Debian's rabbitmq-server with the MQTT,
// HTTP auth and consistent-hash exchange plugins; tests/cluster/engine.ts, installed with apt-get
// when missing and running as root) and the real PostgreSQL: two ingest workers in this process
// consume the readings' shards. Issue 19 asks that several stateless workers share the stream;
// the writer's per-sensor order (app/.server/ingest/writer.ts) asks that a sensor's readings commit
// in the order it sent them, including while a shard moves from one worker to the other.
// NW_CLUSTER_TEST_BASE_PORT (20 ports from it) moves the engine's ports.
import express from "express";
import mqtt from "mqtt";
import { rmSync } from "node:fs";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { engineAuthRouter } from "~/.server/cluster/auth";
import { startIngestWorker, type RunningWorker } from "~/.server/cluster/worker";
import { pool } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { startEngineCluster, type EngineCluster } from "./engine";
import { makeSensor, makeSite, makeSpot, makeUser } from "../integration/helpers";

const KEY = "s".repeat(24);
const SHARDS = 4;
const SENSORS = 16;
const PER_ROUND = 10;
const MIN = 60_000;
const dir = path.resolve(`.data/cluster-shards-${process.pid}`);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function eventually(cond: () => boolean | Promise<boolean>, ms = 60_000) {
  const until = Date.now() + ms;
  while (!(await cond())) {
    if (Date.now() > until) return false;
    await sleep(100);
  }
  return true;
}

describe("ingest workers sharing the stream (sharded by sensor)", () => {
  let engine: EngineCluster | undefined;
  let closeAuth: (() => void) | undefined;
  const workers: RunningWorker[] = [];
  const clients: mqtt.MqttClient[] = [];

  beforeAll(async () => {
    const app = express();
    app.use("/cluster/auth", engineAuthRouter(KEY));
    const server = app.listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    closeAuth = () => server.close();
    const authUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}/cluster/auth`;
    engine = await startEngineCluster({
      dir,
      basePort: Number(process.env.NW_CLUSTER_TEST_BASE_PORT ?? 26340),
      nodes: 1,
      authUrls: [authUrl],
      authKey: KEY,
      tag: "nwshards",
    });
  }, 300_000);

  afterAll(async () => {
    for (const c of clients) await c.endAsync(true).catch(() => {});
    for (const w of workers) await w.close().catch(() => {});
    await engine?.stop();
    closeAuth?.();
    rmSync(dir, { recursive: true, force: true });
  }, 120_000);

  it("has both workers take deliveries while each sensor's readings commit in the order it sent them", async () => {
    // Commit order as the writers report it (after each COMMIT), over both workers.
    const committed = new Map<number, number[]>();
    const logs: string[] = [];
    const start = (name: string) => {
      const writer = new ReadingWriter();
      writer.onBatch((rows) => {
        for (const r of rows) {
          const list = committed.get(r.sensorId) ?? [];
          list.push(r.measuredAt.getTime());
          committed.set(r.sensorId, list);
        }
      });
      return startIngestWorker({
        urls: engine!.amqpUrls(),
        queue: "nichewise.readings",
        shards: SHARDS,
        prefetch: 400,
        writer,
        rebalanceMs: 200,
        log: (s) => void logs.push(`${name}: ${s}`),
        connectionString: process.env.DATABASE_URL,
      });
    };
    // The first worker alone registers first on every shard, so it starts active on all of them;
    // the second takes shards over as the first hands them on.
    workers.push(await start("a"));
    workers.push(await start("b"));
    const [a, b] = workers;

    const site = await makeSite(await makeUser());
    const sensors = [];
    for (let i = 0; i < SENSORS; i++) sensors.push(await makeSensor(site, await makeSpot(site)));
    for (const s of sensors) {
      const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${engine!.nodes[0].mqttPort}`, {
        protocolVersion: 4,
        username: String(s.id),
        password: s.secret,
        reconnectPeriod: 0,
      });
      c.on("error", () => {});
      clients.push(c);
    }

    // Rounds of 10 readings per sensor, a minute apart, sent without waiting for each other's PUBACK.
    const from = Date.now() - 20 * 86_400_000;
    let sent = 0;
    let round = 0;
    // Until the shards have spread (two each), or 300 rounds.
    const spread = () =>
      a.stats.accepted > 0 &&
      b.stats.accepted > 0 &&
      a.activeShards().length === SHARDS / 2 &&
      b.activeShards().length === SHARDS / 2;
    while (round < 300 && !(round >= 5 && spread())) {
      await Promise.all(
        sensors.map((s, i) => {
          const sends = [];
          for (let j = 0; j < PER_ROUND; j++) {
            const at = new Date(from + (round * PER_ROUND + j) * MIN).toISOString();
            sends.push(
              clients[i].publishAsync(
                `nichewise/sensors/${s.id}/reading`,
                JSON.stringify({ time: at, temperature: 20 + (j % 3) * 0.1, humidity: 60 }),
                { qos: 1 },
              ),
            );
          }
          return Promise.all(sends);
        }),
      );
      sent += SENSORS * PER_ROUND;
      round++;
    }
    const ids = sensors.map((s) => s.id);
    const stored = async () =>
      (await pool().query<{ n: number }>("SELECT count(*)::int AS n FROM readings WHERE sensor_id = ANY($1)", [ids]))
        .rows[0].n;
    expect(await eventually(async () => (await stored()) >= sent)).toBe(true);

    console.log(
      `${round} rounds, ${sent} readings; worker a stored ` +
        `${a.stats.accepted} (shards [${a.activeShards()}]), b ` +
        `${b.stats.accepted} (shards [${b.activeShards()}])\n` +
        `${logs.join("\n")}`,
    );
    // Both workers wrote readings: the stream is shared, not one active worker and a standby.
    expect(a.stats.accepted).toBeGreaterThan(0);
    expect(b.stats.accepted).toBeGreaterThan(0);
    expect(a.stats.handovers).toBeGreaterThan(0);
    // Every reading stored once.
    expect(await stored()).toBe(sent);
    // Per sensor, commits in the order sent (strictly increasing times: none out of order, none twice).
    for (const id of ids) {
      const times = committed.get(id) ?? [];
      expect(times.length).toBe(round * PER_ROUND);
      const outOfOrder = times.findIndex((t, i) => i > 0 && t <= times[i - 1]);
      expect(outOfOrder, `sensor ${id}: reading ${outOfOrder} committed after a later one`).toBe(-1);
    }
  }, 300_000);

  it("routes a sensor's plain-number channel topics (to shard 0) and stores them", async () => {
    const site = await makeSite(await makeUser());
    const sensor = await makeSensor(site, await makeSpot(site));
    const c = await mqtt.connectAsync(`mqtt://127.0.0.1:${engine!.nodes[0].mqttPort}`, {
      protocolVersion: 4,
      username: String(sensor.id),
      password: sensor.secret,
      reconnectPeriod: 0,
    });
    c.on("error", () => {});
    clients.push(c);
    await c.publishAsync(`nichewise/sensors/${sensor.id}/temperature`, "21.5", { qos: 1 });
    const row = async () =>
      (await pool().query<{ t: number }>("SELECT temperature AS t FROM readings WHERE sensor_id = $1", [sensor.id]))
        .rows;
    expect(await eventually(async () => (await row()).length === 1)).toBe(true);
    expect((await row())[0].t).toBeCloseTo(21.5);
  }, 120_000);
});
