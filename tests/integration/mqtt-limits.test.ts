// What an MQTT client can cost the server before and after it signs in: packets are refused by the
// length their fixed header announces (MQTT 3.1.1 §2.2.3) before their bodies are buffered, the
// number of connections is bounded, a connection that sends no CONNECT is closed, a browser page of
// another site cannot open the WebSocket port (RFC 6455 §4.1, §10.2: servers check Origin), and a
// client id belongs to the sensor that signed in with it (§3.1.4: a CONNECT with a client id in use
// closes the older connection, which must not let one household's sensor take another's).
// Raw sockets speak MQTT through mqtt-packet, the codec MQTT.js is built on.
import { connect as tcpConnect, type Socket } from "node:net";
import { connectAsync, type MqttClient } from "mqtt";
import mqttPacket from "mqtt-packet";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import WebSocket from "ws";
import { pool } from "~/.server/db";
import { MAX_CONNECT_BYTES, startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { ReadingWriter } from "~/.server/ingest/writer";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";
import { remainingLength } from "./ingest-mqtt-wire";

const brokers: RunningBroker[] = [];
const clients: MqttClient[] = [];
const sockets: Socket[] = [];

async function broker(
  opts: { maxConnections?: number; connectTimeoutMs?: number; wsPort?: number | null; allowedOrigins?: string[] } = {},
) {
  const b = await startBroker({
    host: "127.0.0.1",
    port: 0,
    wsPort: opts.wsPort ?? null,
    writer: new ReadingWriter(),
    log: () => {},
    ...opts,
  });
  brokers.push(b);
  return b;
}

let shared: RunningBroker;
beforeAll(async () => {
  shared = await broker();
});
afterAll(async () => {
  for (const s of sockets) s.destroy();
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => {})));
  for (const b of brokers) await b.close();
});

async function sensorPair() {
  const site = await makeSite(await makeUser());
  return makeSensor(site, await makeSpot(site));
}

function rawSocket(port: number): Promise<Socket> {
  return new Promise((resolve, reject) => {
    const s = tcpConnect(port, "127.0.0.1", () => resolve(s));
    s.on("error", () => {}); // a reset by the broker is what some tests wait for
    s.once("error", reject);
    sockets.push(s);
  });
}

const closed = (s: Socket) =>
  new Promise<void>((resolve) => (s.destroyed ? resolve() : s.once("close", () => resolve())));

/**
 * Sends a fixed header announcing `announced` bytes, then body bytes in 64 KB chunks (waiting for
 * each to drain, so this side buffers nothing) until `upTo` bytes or the broker closes the socket.
 */
async function flood(socket: Socket, firstByte: number, announced: number, upTo: number) {
  let sent = 0;
  let isClosed = false;
  socket.once("close", () => (isClosed = true));
  const chunk = Buffer.alloc(64 * 1024, 0x61);
  socket.write(Buffer.concat([Buffer.from([firstByte]), remainingLength(announced)]));
  while (!isClosed && sent < upTo) {
    const more = socket.write(chunk);
    sent += chunk.length;
    if (!more)
      await new Promise<void>((r) => {
        socket.once("drain", r);
        socket.once("close", r);
      });
  }
  await closed(socket);
  return sent;
}

const rss = () => process.memoryUsage().rss;
const MB = 1024 * 1024;

async function mqttClient(port: number, sensor: { id: number; secret: string }, clientId: string) {
  const c = await connectAsync(`mqtt://127.0.0.1:${port}`, {
    protocolVersion: 4,
    username: String(sensor.id),
    password: sensor.secret,
    clientId,
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  clients.push(c);
  return c;
}

describe("packet sizes", () => {
  it("closes a connection whose CONNECT announces 200 MB without buffering it", async () => {
    const s = await rawSocket(shared.port);
    const before = rss();
    // CONNECT is packet type 1 (first byte 0x10). Up to 100 MB would follow if the broker kept reading.
    const sent = await flood(s, 0x10, 200 * MB, 100 * MB);
    const grown = rss() - before;
    console.log(
      `[mqtt-limits] oversized CONNECT: closed after ${(sent / MB).toFixed(1)} MB sent, RSS ${(grown / MB).toFixed(1)} MB more`,
    );
    expect(sent).toBeLessThan(100 * MB);
    // Loose: the broker buffered nothing; the figure moves with the test process's own allocations.
    expect(grown).toBeLessThan(24 * MB);
    // A CONNECT of ordinary size still works beside it.
    const sensor = await sensorPair();
    const c = await mqttClient(shared.port, sensor, `limits-${sensor.id}`);
    expect(c.connected).toBe(true);
  });

  it("a CONNECT just over the limit is refused, one of ordinary size is not", async () => {
    const sensor = await sensorPair();
    const s = await rawSocket(shared.port);
    const packet = mqttPacket.generate({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clean: true,
      keepalive: 60,
      clientId: "x".repeat(MAX_CONNECT_BYTES),
      username: String(sensor.id),
      password: Buffer.from(sensor.secret),
    });
    s.write(packet);
    await closed(s);
    expect(s.destroyed).toBe(true);
  });

  it("closes a signed-in sensor's connection at a PUBLISH announcing 10 MB and records why", async () => {
    const sensor = await sensorPair();
    const s = await rawSocket(shared.port);
    const parser = mqttPacket.parser({ protocolVersion: 4 });
    const connack = new Promise<number>((r) =>
      parser.on("packet", (p) => p.cmd === "connack" && r(p.returnCode ?? -1)),
    );
    s.on("data", (b) => parser.parse(b));
    s.write(
      mqttPacket.generate({
        cmd: "connect",
        protocolId: "MQTT",
        protocolVersion: 4,
        clean: true,
        keepalive: 60,
        clientId: `big-${sensor.id}`,
        username: String(sensor.id),
        password: Buffer.from(sensor.secret),
      }),
    );
    expect(await connack).toBe(0);
    // PUBLISH QoS 1 (0x32).
    const sent = await flood(s, 0x32, 10 * MB, 10 * MB);
    expect(sent).toBeLessThan(10 * MB);
    const reasons = async () =>
      (
        await pool().query<{ reason: string }>("SELECT reason FROM rejected_messages WHERE sensor_id = $1", [sensor.id])
      ).rows.map((r) => r.reason);
    for (let i = 0; i < 100 && (await reasons()).length === 0; i++) await new Promise((r) => setTimeout(r, 50));
    expect(await reasons()).toEqual([
      expect.stringMatching(/^publish packet of 10485760 bytes is over \d+ bytes: connection closed$/),
    ]);
  });
});

describe("connections before CONNECT", () => {
  it("closes a connection that never sends CONNECT, and one that sends half of it", async () => {
    const b = await broker({ connectTimeoutMs: 300 });
    const idle = await rawSocket(b.port);
    const half = await rawSocket(b.port);
    const sensor = await sensorPair();
    const connect = mqttPacket.generate({
      cmd: "connect",
      protocolId: "MQTT",
      protocolVersion: 4,
      clean: true,
      keepalive: 60,
      clientId: "half",
      username: String(sensor.id),
      password: Buffer.from(sensor.secret),
    });
    half.write(connect.subarray(0, connect.length - 3));
    await closed(idle);
    await closed(half);
    expect([idle.destroyed, half.destroyed]).toEqual([true, true]);
  });

  it("bounds open connections: one over the limit is closed at once, and a freed place is taken again", async () => {
    const b = await broker({ maxConnections: 2 });
    const first = await rawSocket(b.port);
    const second = await rawSocket(b.port);
    const third = await rawSocket(b.port);
    await closed(third);
    expect(b.stats.refusedConnections).toBe(1);
    expect([first.destroyed, second.destroyed]).toEqual([false, false]);
    first.destroy();
    await closed(first);
    // The broker sees the close a moment later; a sensor retrying gets in.
    const sensor = await sensorPair();
    let c: MqttClient | null = null;
    for (let i = 0; i < 50 && !c; i++) {
      c = await mqttClient(b.port, sensor, `after-${sensor.id}`).catch(() => null);
      if (!c) await new Promise((r) => setTimeout(r, 50));
    }
    expect(c?.connected).toBe(true);
  });
});

describe("MQTT over WebSocket", () => {
  it("refuses a browser page of another origin, takes the app's own origin and clients that send none", async () => {
    const b = await broker({ wsPort: 0, allowedOrigins: ["http://127.0.0.1:3000"] });
    const url = `ws://127.0.0.1:${b.wsPort}`;
    const handshake = (origin?: string) =>
      new Promise<number>((resolve) => {
        const ws = new WebSocket(url, "mqtt", origin ? { origin } : {});
        ws.on("open", () => {
          ws.terminate();
          resolve(101);
        });
        ws.on("unexpected-response", (_req, res) => {
          resolve(res.statusCode ?? 0);
          ws.terminate();
        });
        ws.on("error", () => resolve(-1));
      });
    // OWASP HTML5 Security Cheat Sheet, WebSockets: check the Origin header.
    expect(await handshake("https://evil.example")).toBe(403);
    expect(await handshake("http://127.0.0.1:3000")).toBe(101);
    expect(await handshake()).toBe(101);
    // A sensor over WebSocket (MQTT.js in Node sends no Origin) signs in and publishes.
    const sensor = await sensorPair();
    const c = await connectAsync(url, {
      protocolVersion: 4,
      username: String(sensor.id),
      password: sensor.secret,
      clientId: `ws-${sensor.id}`,
      reconnectPeriod: 0,
      connectTimeout: 5000,
    });
    clients.push(c);
    await c.publishAsync(`nichewise/sensors/${sensor.id}/reading`, JSON.stringify({ temperature: 19.5 }), { qos: 1 });
    const n = await pool().query<{ n: number }>("SELECT count(*)::int AS n FROM readings WHERE sensor_id = $1", [
      sensor.id,
    ]);
    expect(n.rows[0].n).toBe(1);
  });
});

describe("client ids", () => {
  it("a sensor of another household connecting with a sensor's client id does not take it over", async () => {
    const a = await sensorPair();
    const b = await sensorPair();
    const clientId = `nichewise-sim-${a.id}`; // the simulator's id for sensor A
    const ca = await mqttClient(shared.port, a, clientId);
    let aClosed = false;
    ca.on("close", () => (aClosed = true));
    const cb = await mqttClient(shared.port, b, clientId);
    expect(cb.connected).toBe(true);
    // A is still there: its next QoS 1 publish is acknowledged on the same connection.
    await ca.publishAsync(`nichewise/sensors/${a.id}/reading`, JSON.stringify({ temperature: 20 }), { qos: 1 });
    await cb.publishAsync(`nichewise/sensors/${b.id}/reading`, JSON.stringify({ temperature: 21 }), { qos: 1 });
    expect(aClosed).toBe(false);
    expect(ca.connected).toBe(true);

    // The same sensor reconnecting with its own client id still replaces its older connection (§3.1.4).
    const a2 = await mqttClient(shared.port, a, clientId);
    await new Promise<void>((r) => (aClosed ? r() : ca.once("close", () => r())));
    expect(a2.connected).toBe(true);
  });
});
