// Bridge mode against a real Mosquitto (Debian's package) on loopback, standing for the broker a
// grower already runs, with gateways publishing through MQTT.js in the formats of their public
// documentation (the payloads' pages are named in app/domain/payloads/presets.test.ts).
// MQTT 3.1.1 §4.3.2 / MQTT 5 §4.3.2: QoS 1 is at-least-once; the PUBACK hands the message over, so
// the bridge sends it only after the commit, and a message not acknowledged comes again (§4.4).
import { connectAsync, type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { pool } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { embeddedPid, startEmbeddedPostgres } from "~/.server/postgres";
import { spotSeries } from "~/.server/series";
import { foundTopics, startListening } from "~/.server/bridge/discovery";
import { SiteBridge } from "~/.server/bridge/runtime";
import { TOPIC_BURST } from "~/.server/bridge/state";
import { attachTopic, getBridge, listLinks, saveBridge, type BridgeConfig } from "~/.server/bridge/store";
import type { Mapping } from "~/domain/payloads/presets";
import { freshRollups, makeSensor, makeSite, makeSpot, makeUser, storedRollups } from "./helpers";
import { startMosquitto, removeMosquittoDir, type Mosquitto } from "./mosquitto";

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const TZ = "Europe/London";

let broker: Mosquitto;
let gateway: MqttClient;
const bridges: SiteBridge[] = [];

beforeAll(async () => {
  broker = await startMosquitto({ users: { nichewise: "bridge pass 1", gateway: "gw pass 2" }, tls: true });
  gateway = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
    username: "gateway",
    password: "gw pass 2",
    clientId: "test-gateway",
    reconnectPeriod: 200,
  });
});

afterAll(async () => {
  for (const b of bridges) await b.stop();
  await gateway?.endAsync(true).catch(() => {});
  await broker?.stop();
  if (broker) removeMosquittoDir(broker);
});

async function until<T>(what: string, fn: () => Promise<T | null | false | undefined>, ms = 30_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await sleep(100);
  }
}

/** A site with one spot and sensor per topic, a bridge to the test broker, and the topics attached. */
async function setUp(
  attach: { topic: string; mapping: Mapping; indoor?: boolean }[],
  opts: { protocolVersion?: 4 | 5; tls?: boolean } = {},
) {
  const user = await makeUser();
  const site = await makeSite(user, { timeZone: TZ });
  const url = opts.tls ? `mqtts://localhost:${broker.tlsPort}` : `mqtt://127.0.0.1:${broker.port}`;
  await saveBridge({
    siteId: site.id,
    actorId: user.id,
    url,
    username: "nichewise",
    password: "bridge pass 1",
    clearPassword: false,
    caCert: opts.tls ? broker.caPem : null,
    protocolVersion: opts.protocolVersion ?? 4,
    enabled: true,
  });
  const sensors = [];
  for (const a of attach) {
    const spot = await makeSpot(site, { indoor: a.indoor ?? true });
    const sensor = await makeSensor(site, spot);
    await attachTopic({ siteId: site.id, actorId: user.id, sensorId: sensor.id, topic: a.topic, mapping: a.mapping });
    sensors.push({ sensor, spot });
  }
  const config = (await getBridge(site.id))!;
  return { user, site, config, sensors };
}

async function run(config: BridgeConfig, writer = new ReadingWriter()) {
  const bridge = new SiteBridge(config, await listLinks(config.id), { writer, reconnectMs: 200, maxReconnectMs: 1000 });
  bridges.push(bridge);
  bridge.start();
  await until("the bridge to connect", async () => bridge.state.status === "connected");
  // The subscription is asked for on connect; give the broker a moment to have it.
  await sleep(200);
  return bridge;
}

const rows = async (sensorId: number) =>
  (
    await pool().query(
      "SELECT measured_at, temperature, humidity, lux, battery FROM readings WHERE sensor_id = $1 ORDER BY measured_at",
      [sensorId],
    )
  ).rows;

/** A wall-clock time in the site's zone as Tasmota writes `Time` (no offset). */
function tasmotaTime(d: Date) {
  const p = Object.fromEntries(
    new Intl.DateTimeFormat("en-GB", {
      timeZone: TZ,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      second: "2-digit",
      hourCycle: "h23",
    })
      .formatToParts(d)
      .map((x) => [x.type, x.value]),
  );
  return `${p.year}-${p.month}-${p.day}T${p.hour}:${p.minute}:${p.second}`;
}

describe("bridge mode through a real Mosquitto", () => {
  it("stores each preset's readings in the right spot at the right time, visible in the spot's readings", async () => {
    const mac = "A4:C1:38:1E:5B:6F";
    const { sensors, config } = await setUp([
      { topic: "zigbee2mqtt/orchid bench", mapping: { preset: "zigbee2mqtt" } },
      { topic: "tele/shelf/SENSOR", mapping: { preset: "tasmota", device: "AM2301" } },
      {
        topic: "greenhouse/sensor/shelf_temperature/state",
        mapping: { preset: "esphome", channel: "temperature", unit: "C" },
      },
      { topic: "shellyhtg3-84fce63bc2a8/events/rpc", mapping: { preset: "shelly", device: "0" } },
      { topic: "home/OMG_ESP32_BLE/BTtoMQTT", mapping: { preset: "ble-gateway", device: mac } },
      {
        topic: "lab/env",
        mapping: { preset: "custom", unit: "F", paths: { temperature: "env.t", humidity: "env.rh", time: "ts" } },
      },
    ]);
    const bridge = await run(config);
    const measured = new Date(Math.floor((Date.now() - 10 * 60_000) / 1000) * 1000);
    const pub = (topic: string, payload: string) => gateway.publishAsync(topic, payload, { qos: 1 });
    await pub(
      "zigbee2mqtt/orchid bench",
      JSON.stringify({ temperature: 21.4, humidity: 63.2, battery: 91, linkquality: 120 }),
    );
    await pub(
      "tele/shelf/SENSOR",
      JSON.stringify({ Time: tasmotaTime(measured), AM2301: { Temperature: 75.2, Humidity: 58.2 }, TempUnit: "F" }),
    );
    await pub("greenhouse/sensor/shelf_temperature/state", "19.5");
    await pub(
      "shellyhtg3-84fce63bc2a8/events/rpc",
      JSON.stringify({
        src: "shellyhtg3-84fce63bc2a8",
        dst: "shellyhtg3-84fce63bc2a8/events",
        method: "NotifyStatus",
        params: {
          ts: measured.getTime() / 1000,
          "temperature:0": { id: 0, tC: 18.2, tF: 64.8 },
          "humidity:0": { id: 0, rh: 71 },
        },
      }),
    );
    // A neighbour's tag in the same shared topic: not attached, not stored, not an error.
    await pub("home/OMG_ESP32_BLE/BTtoMQTT", JSON.stringify({ id: "11:22:33:44:55:66", rssi: -90, tempc: 5 }));
    await pub(
      "home/OMG_ESP32_BLE/BTtoMQTT",
      JSON.stringify({ id: mac, model_id: "LYWSD03MMC_ATC", tempc: 22.6, tempf: 72.68, hum: 53, batt: 89 }),
    );
    await pub("lab/env", JSON.stringify({ env: { t: 68, rh: 50 }, ts: measured.getTime() / 1000 }));

    const [z2m, tasmota, esphome, shelly, ble, custom] = sensors;
    const stored = await until("every preset's reading", async () => {
      const all = await Promise.all(sensors.map((s) => rows(s.sensor.id)));
      return all.every((r) => r.length === 1) && all;
    });
    expect(stored[0][0]).toMatchObject({ humidity: expect.closeTo(63.2, 3), battery: 91 });
    expect(stored[0][0].temperature).toBeCloseTo(21.4, 3);
    // Tasmota: 75.2 °F is 24 °C; its zone-less Time read in the site's zone.
    expect(stored[1][0].temperature).toBeCloseTo(24, 3);
    expect(stored[1][0].measured_at.getTime()).toBe(measured.getTime());
    expect(stored[2][0]).toMatchObject({ temperature: 19.5, humidity: null });
    expect(stored[3][0].temperature).toBeCloseTo(18.2, 3);
    expect(stored[3][0].humidity).toBe(71);
    expect(stored[3][0].measured_at.getTime()).toBe(measured.getTime());
    expect(stored[4][0]).toMatchObject({ humidity: 53, battery: 89 });
    expect(stored[4][0].temperature).toBeCloseTo(22.6, 3);
    expect(stored[5][0].temperature).toBeCloseTo(20, 3);
    expect(stored[5][0].measured_at.getTime()).toBe(measured.getTime());

    // "Stored" means visible: each spot's chart data (the spot page's 48-hour series) shows it.
    for (const { spot } of [z2m, tasmota, esphome, shelly, ble, custom]) {
      const series = await spotSeries(spot.id, TZ, "48h");
      expect(series.t.length).toBe(1);
    }
    expect(bridge.state.counts).toMatchObject({ stored: 6, rejected: 0, otherDevices: 1 });
    const other = await until(
      "the unattached device to be recorded",
      async () =>
        (
          await pool().query<{ reason: string }>(
            "SELECT reason FROM rejected_messages WHERE topic = 'home/OMG_ESP32_BLE/BTtoMQTT'",
          )
        ).rows[0],
    );
    expect(other.reason).toBe(
      "home broker: device 11:22:33:44:55:66 in this topic is not attached to a sensor (others may be too)",
    );
    expect(bridge.state.lastMessageAt).not.toBeNull();
  });

  it("counts readings of a sensor placed nowhere as outside any spot, as HTTP ingest does", async () => {
    const user = await makeUser();
    const site = await makeSite(user, { timeZone: TZ });
    await saveBridge({
      siteId: site.id,
      actorId: user.id,
      url: `mqtt://127.0.0.1:${broker.port}`,
      username: "nichewise",
      password: "bridge pass 1",
      clearPassword: false,
      caCert: null,
      protocolVersion: 4,
      enabled: true,
    });
    const unplaced = await makeSensor(site);
    await attachTopic({
      siteId: site.id,
      actorId: user.id,
      sensorId: unplaced.id,
      topic: "zigbee2mqtt/in a drawer",
      mapping: { preset: "zigbee2mqtt" },
    });
    const bridge = await run((await getBridge(site.id))!);
    await gateway.publishAsync("zigbee2mqtt/in a drawer", '{"temperature":20,"humidity":50}', { qos: 1 });
    await until("the reading", async () => (await rows(unplaced.id)).length === 1);
    await until("the count", async () => bridge.state.counts.outsideSpot === 1);
  });

  it("records bad payloads and unit mix-ups with their reason, acknowledges them, and carries on", async () => {
    const { sensors, config } = await setUp([
      { topic: "zigbee2mqtt/bad", mapping: { preset: "zigbee2mqtt" } },
      // Set up as °C, but the node sends °F: 75 is beyond what an indoor spot can see.
      { topic: "node/sensor/t/state", mapping: { preset: "esphome", channel: "temperature", unit: "C" } },
    ]);
    const bridge = await run(config);
    await gateway.publishAsync("zigbee2mqtt/bad", '{"temperature":"warm"}', { qos: 1 });
    await gateway.publishAsync("zigbee2mqtt/bad", "not json at all", { qos: 1 });
    await gateway.publishAsync("node/sensor/t/state", "75", { qos: 1 });
    // 100 KB: read, acknowledged and recorded as too big; not resent forever.
    await gateway.publishAsync("zigbee2mqtt/bad", Buffer.alloc(100_000, 32), { qos: 1 });
    await gateway.publishAsync("zigbee2mqtt/bad", '{"temperature":20.5,"humidity":55}', { qos: 1 });
    await until("the good reading after the bad ones", async () => (await rows(sensors[0].sensor.id)).length === 1);
    const reasons = async (sensorId: number) =>
      (
        await pool().query<{ reason: string }>(
          "SELECT reason FROM rejected_messages WHERE sensor_id = $1 ORDER BY id",
          [sensorId],
        )
      ).rows.map((r) => r.reason);
    const bad = await until("the rejections to be recorded", async () => {
      const r = await reasons(sensors[0].sensor.id);
      return r.length === 3 && r;
    });
    // Each message's rejection is written on its own (recordRejectionsSoon), so two may commit in either order.
    expect([...bad].sort()).toEqual(
      [
        "home broker: temperature: not a number",
        "home broker: payload is not JSON",
        "home broker: payload over 4096 bytes",
      ].sort(),
    );
    const mixUp = await until("the unit mix-up", async () => (await reasons(sensors[1].sensor.id))[0]);
    expect(mixUp).toMatch(/temperature: 75 °C is outside what an indoor spot can see/);
    expect(await rows(sensors[1].sensor.id)).toEqual([]);
    const counted = await pool().query<{ rejected_count: number }>("SELECT rejected_count FROM sensors WHERE id = $1", [
      sensors[0].sensor.id,
    ]);
    expect(counted.rows[0].rejected_count).toBe(3);
    expect(bridge.state.counts.rejected).toBe(4);
  });

  it(
    "acknowledges only after the commit: PostgreSQL killed mid-stream, every reading stored once",
    { timeout: 180_000 },
    async () => {
      const { sensors, config } = await setUp([
        { topic: "lab/stream", mapping: { preset: "custom", paths: { temperature: "t", humidity: "h", time: "ts" } } },
      ]);
      const [{ sensor, spot }] = sensors;
      const bridge = await run(config);
      const N = 300;
      const base = Math.floor((Date.now() - 3_600_000) / 1000) * 1000;
      const publisher = (async () => {
        for (let i = 0; i < N; i++) {
          await gateway.publishAsync(
            "lab/stream",
            JSON.stringify({ t: 15 + (i % 40) / 4, h: 50 + (i % 30), ts: base + i * 1000 }),
            { qos: 1 },
          );
          await sleep(10);
        }
      })();
      await until("some readings before the outage", async () => (await rows(sensor.id)).length >= 20);
      const dataDir = inject("pgDataDir");
      const pid = embeddedPid(dataDir)!;
      process.kill(pid, "SIGKILL");
      await until("the bridge to fail a commit", async () => bridge.state.counts.writeFailures > 0, 60_000);
      await restartPostgres(dataDir, inject("pgPort"));
      await publisher;
      const all = await until(
        "every reading after the restart",
        async () => (await rows(sensor.id).catch(() => [])).length === N && true,
        120_000,
      );
      expect(all).toBe(true);
      const res = await pool().query(
        "SELECT count(*)::int AS n, count(DISTINCT measured_at)::int AS " +
          "d, min(measured_at) AS first, max(measured_at) AS last FROM " +
          "readings WHERE sensor_id = $1",
        [sensor.id],
      );
      expect(res.rows[0]).toMatchObject({ n: N, d: N });
      expect(res.rows[0].first.getTime()).toBe(base);
      expect(res.rows[0].last.getTime()).toBe(base + (N - 1) * 1000);
      const stored = await storedRollups(spot.id);
      expect(stored.reduce((s, r) => s + r.n, 0)).toBe(N);
      const fresh = await freshRollups(spot.id);
      expect(stored.map((r) => [new Date(r.hour).toISOString(), r.n, r.hn])).toEqual(
        fresh.map((r) => [new Date(r.hour).toISOString(), r.n, r.hn]),
      );
      expect(bridge.state.counts.reconnects).toBeGreaterThan(0);
    },
  );

  it(
    "loses nothing when the bridge is stopped mid-stream and started again: the broker kept the session",
    { timeout: 120_000 },
    async () => {
      const { sensors, config } = await setUp([
        { topic: "lab/resume", mapping: { preset: "custom", paths: { temperature: "t", time: "ts" } } },
      ]);
      const [{ sensor, spot }] = sensors;
      const first = await run(config);
      const N = 200;
      const base = Math.floor((Date.now() - 2 * 3_600_000) / 1000) * 1000;
      for (let i = 0; i < N; i++) {
        await gateway.publishAsync("lab/resume", JSON.stringify({ t: 20 + (i % 10) / 10, ts: base + i * 1000 }), {
          qos: 1,
        });
        if (i === 50) await first.stop(); // forced: what it had in hand is not acknowledged
      }
      const second = await run(config);
      await until("every reading", async () => (await rows(sensor.id)).length === N, 60_000);
      const stored = await storedRollups(spot.id);
      expect(stored.reduce((s, r) => s + r.n, 0)).toBe(N);
      expect(stored.map((r) => r.n)).toEqual((await freshRollups(spot.id)).map((r) => r.n));
      expect(second.state.counts.stored).toBeGreaterThan(0);
    },
  );

  it("reconnects after the home broker restarts and goes on storing", { timeout: 120_000 }, async () => {
    const { sensors, config } = await setUp([
      { topic: "zigbee2mqtt/after restart", mapping: { preset: "zigbee2mqtt" } },
    ]);
    const bridge = await run(config);
    await broker.stop();
    await until("the bridge to notice", async () => bridge.state.status !== "connected");
    await broker.restart();
    await until("the bridge to reconnect", async () => bridge.state.status === "connected", 60_000);
    await sleep(300);
    await until("the gateway to reconnect", async () => gateway.connected);
    await gateway.publishAsync("zigbee2mqtt/after restart", '{"temperature":22,"humidity":60}', { qos: 1 });
    await until("the reading", async () => (await rows(sensors[0].sensor.id)).length === 1);
    expect(bridge.state.counts.reconnects).toBeGreaterThan(0);
  });

  it(
    "takes a flood by holding it back, not queueing it: every message read, its rejections recorded once",
    { timeout: 120_000 },
    async () => {
      const mac = "A4:C1:38:00:00:0F";
      const { sensors, config } = await setUp([
        { topic: "home/busy/BTtoMQTT", mapping: { preset: "ble-gateway", device: mac } },
      ]);
      const bridge = await run(config);
      // A gateway in a block of flats: hundreds of the neighbours' advertisements, some garbage, then ours.
      const others = 2 * TOPIC_BURST;
      const garbage = TOPIC_BURST;
      const sends = [
        ...Array.from({ length: others }, (_, i) =>
          JSON.stringify({ id: `11:22:33:44:${String(i % 100).padStart(2, "0")}:66`, rssi: -90, tempc: 5 }),
        ),
        ...Array.from({ length: garbage }, () => "{not json"),
        JSON.stringify({ id: mac, tempc: 21.5, hum: 58 }),
      ];
      await Promise.all(sends.map((p) => gateway.publishAsync("home/busy/BTtoMQTT", p, { qos: 1 })));
      await until("the flood to be read", async () => bridge.state.counts.received === sends.length, 60_000);
      // Over the topic's rate the bridge waited (the broker held the rest) rather than dropping or queueing.
      expect(bridge.state.counts.heldBack).toBeGreaterThan(0);
      await until("our reading", async () => (await rows(sensors[0].sensor.id)).length === 1);
      expect(bridge.state.counts).toMatchObject({ otherDevices: others, rejected: garbage, stored: 1 });
      const recorded = await pool().query("SELECT count(*)::int AS n FROM rejected_messages WHERE sensor_id = $1", [
        sensors[0].sensor.id,
      ]);
      expect(recorded.rows[0].n).toBe(1);
    },
  );

  it("skips a retained message without a time of its own (an old value) but stores one that carries its time", async () => {
    const measured = new Date(Math.floor((Date.now() - 5 * 60_000) / 1000) * 1000);
    await gateway.publishAsync("zigbee2mqtt/retained old", '{"temperature":19,"humidity":50}', {
      qos: 1,
      retain: true,
    });
    await gateway.publishAsync(
      "shelly-retained/events/rpc",
      JSON.stringify({
        method: "NotifyStatus",
        params: { ts: measured.getTime() / 1000, "temperature:0": { tC: 17.5 } },
      }),
      { qos: 1, retain: true },
    );
    const { sensors, config } = await setUp([
      { topic: "zigbee2mqtt/retained old", mapping: { preset: "zigbee2mqtt" } },
      { topic: "shelly-retained/events/rpc", mapping: { preset: "shelly", device: "0" } },
    ]);
    const bridge = await run(config);
    await until("the timed retained reading", async () => (await rows(sensors[1].sensor.id)).length === 1);
    await until("the untimed one to be skipped", async () => bridge.state.counts.staleRetained === 1);
    expect(await rows(sensors[0].sensor.id)).toEqual([]);
  });

  it("connects with MQTT 5 over TLS with the grower's own CA", async () => {
    const { sensors, config } = await setUp([{ topic: "zigbee2mqtt/tls", mapping: { preset: "zigbee2mqtt" } }], {
      protocolVersion: 5,
      tls: true,
    });
    await run(config);
    await gateway.publishAsync("zigbee2mqtt/tls", '{"temperature":23.5,"humidity":61}', { qos: 1 });
    await until("the reading over TLS", async () => (await rows(sensors[0].sensor.id)).length === 1);
  });

  it("shows a refused password as the bridge's error", async () => {
    const { config } = await setUp([]);
    const bridge = new SiteBridge({ ...config, password: "wrong" }, [], {
      writer: new ReadingWriter(),
      reconnectMs: 200,
    });
    bridges.push(bridge);
    bridge.start();
    const error = await until("the error", async () => bridge.state.lastError);
    expect(error.message).toMatch(/Not authorized|Bad user name or password/i);
    expect(bridge.state.status).not.toBe("connected");
  });

  it("listens under a prefix and suggests what each topic is, with Home Assistant discovery units", async () => {
    const { config } = await setUp([]);
    const l = startListening(config, "", { durationMs: 3000 });
    await until("the listener", async () => l.status === "listening" && l.startedAt > 0);
    await sleep(500);
    await gateway.publishAsync(
      "homeassistant/sensor/porch/porch_temperature/config",
      JSON.stringify({ dev_cla: "temperature", unit_of_meas: "°F", stat_t: "porch/sensor/porch_temperature/state" }),
      { qos: 1 },
    );
    await gateway.publishAsync("porch/sensor/porch_temperature/state", "68", { qos: 1 });
    await gateway.publishAsync("home/gw2/BTtoMQTT", JSON.stringify({ id: "A4:C1:38:00:00:02", tempc: 21, hum: 55 }), {
      qos: 1,
    });
    await until("the listening to end", async () => l.status !== "listening", 10_000);
    const found = foundTopics(l, TZ);
    const porch = found.find((f) => f.topic === "porch/sensor/porch_temperature/state")!;
    expect(porch.mapping).toMatchObject({ preset: "esphome", channel: "temperature", unit: "F" });
    expect(porch.preview[0].temperature).toBeCloseTo(20, 6);
    const ble = found.find((f) => f.topic === "home/gw2/BTtoMQTT")!;
    expect(ble).toMatchObject({
      device: "A4:C1:38:00:00:02",
      mapping: { preset: "ble-gateway", device: "A4:C1:38:00:00:02" },
    });
  });
});

/** Starts the cluster again; retries while the killed server's backends still hold shared memory. */
async function restartPostgres(dataDir: string, port: number) {
  const end = Date.now() + 60_000;
  for (;;) {
    try {
      await startEmbeddedPostgres({ dataDir, port, database: "nichewise_test", log: () => {} });
      return;
    } catch (err) {
      if (Date.now() > end) throw err;
      await sleep(500);
    }
  }
}
