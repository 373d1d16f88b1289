// The ingest path end to end: real aedes broker, real MQTT clients (MQTT.js and Debian's
// mosquitto_pub), the HTTP route, CSV import and the writer, against a fresh PostgreSQL.
import { execFile } from "node:child_process";
import { promisify } from "node:util";
import { connectAsync, type IClientOptions, type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { importCsv } from "~/.server/ingest/csv-import";
import { parseCsv } from "~/.server/ingest/csv-file";
import { handleHttpIngest, MAX_HTTP_BYTES } from "~/.server/ingest/http";
import { ReadingWriter, type CommittedReading } from "~/.server/ingest/writer";
import { placeSensor } from "~/.server/placements";
import { guessMapping } from "~/domain/ingest/csv";
import type { Reading } from "~/domain/ingest/payload";
import { DEMO_SCENARIO, DEMO_SITE, generate } from "../../simulator/model";
import { freshRollups, makeSensor, makeSite, makeSpot, makeUser, storedRollups } from "./helpers";
import { publishPacket, rawConnect } from "./ingest-mqtt-wire";

const run = promisify(execFile);
const MIN = 60_000;
const HOUR = 3_600_000;

let broker: RunningBroker;
let brokerWriter: ReadingWriter;
const clients: MqttClient[] = [];

beforeAll(async () => {
  brokerWriter = new ReadingWriter();
  broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer: brokerWriter, log: () => {} });
});

afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => {})));
  await broker?.close();
});

async function setup(opts: { timeZone?: string; indoor?: boolean } = {}) {
  const user = await makeUser();
  const site = await makeSite(user, { timeZone: opts.timeZone });
  const spot = await makeSpot(site, { indoor: opts.indoor ?? true });
  const sensor = await makeSensor(site, spot);
  return { user, site, spot, sensor };
}

async function mqttClient(sensor: { id: number; secret: string }, extra: IClientOptions = {}) {
  const c = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
    protocolVersion: 4, // aedes speaks MQTT 3.1.1 only
    username: String(sensor.id),
    password: sensor.secret,
    clientId: `t-${sensor.id}-${Math.random().toString(36).slice(2)}`,
    reconnectPeriod: 0,
    connectTimeout: 5000,
    ...extra,
  });
  clients.push(c);
  return c;
}

const topic = (sensor: { id: number }, channel = "reading") => `nichewise/sensors/${sensor.id}/${channel}`;

async function readingsOf(sensorId: number) {
  const res = await pool().query<{
    measured_at: Date;
    temperature: number | null;
    humidity: number | null;
    lux: number | null;
  }>("SELECT measured_at, temperature, humidity, lux FROM readings WHERE sensor_id = $1 ORDER BY measured_at", [
    sensorId,
  ]);
  return res.rows;
}

async function rejectionsOf(sensorId: number) {
  const res = await pool().query<{ reason: string; topic: string | null; source: string; payload: string }>(
    "SELECT reason, topic, source, payload FROM rejected_messages WHERE sensor_id = $1 ORDER BY id",
    [sensorId],
  );
  return res.rows;
}

async function rejectedCount(sensorId: number) {
  const res = await pool().query<{ n: number }>("SELECT rejected_count AS n FROM sensors WHERE id = $1", [sensorId]);
  return res.rows[0].n;
}

async function waitFor<T>(probe: () => Promise<T>, ok: (v: T) => boolean, timeoutMs = 10_000): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe();
    if (ok(v) || Date.now() > until) return v;
    await new Promise((r) => setTimeout(r, 50));
  }
}

const sumN = (rows: { n: number }[]) => rows.reduce((s, r) => s + r.n, 0);
const iso = (d: Date | string) => new Date(d).toISOString();

/** Stored rollups equal an aggregation over raw readings: same hours, same counts, min/max/sum within 1e-3. */
function expectRollupsMatch(
  stored: Awaited<ReturnType<typeof storedRollups>>,
  fresh: Awaited<ReturnType<typeof freshRollups>>,
) {
  expect(stored.map((r) => iso(r.hour))).toEqual(fresh.map((r) => iso(r.hour)));
  for (let i = 0; i < fresh.length; i++) {
    const s = stored[i];
    const f = fresh[i];
    expect([iso(s.hour), s.n, s.hn]).toEqual([iso(f.hour), f.n, f.hn]);
    if (f.n > 0) {
      expect(Math.abs(s.tmin - f.tmin)).toBeLessThan(1e-3);
      expect(Math.abs(s.tmax - f.tmax)).toBeLessThan(1e-3);
      expect(Math.abs(s.tsum - f.tsum)).toBeLessThan(1e-3);
    }
    if (f.hn > 0) expect(Math.abs(s.hsum - f.hsum)).toBeLessThan(1e-3);
  }
}

/** Whole minutes before now, so no timestamp is refused as being in the future. */
const minutesAgo = (m: number) => new Date(Math.floor((Date.now() - m * MIN) / MIN) * MIN);

describe("MQTT ingest with MQTT.js", () => {
  it("stores each QoS 1 reading once, also when a duplicate or an un-acked resend arrives", async () => {
    const { spot, sensor } = await setup();
    const c = await mqttClient(sensor);
    const base = minutesAgo(120);
    const sent = Array.from({ length: 20 }, (_, i) => ({
      time: new Date(base.getTime() + i * MIN).toISOString(),
      temperature: 18 + i / 10,
      humidity: 55,
    }));
    // MQTT 3.1.1 §4.3.2: QoS 1, the PUBACK means the broker took ownership. Ours acks after COMMIT,
    // so the rows must be there as soon as every publish has resolved.
    await Promise.all(sent.map((p) => c.publishAsync(topic(sensor), JSON.stringify(p), { qos: 1 })));
    expect((await readingsOf(sensor.id)).length).toBe(20);
    expect(sumN(await storedRollups(spot.id))).toBe(20);

    // At-least-once delivery allows the same message twice (§4.3.2); dedupe on sensor + time.
    await c.publishAsync(topic(sensor), JSON.stringify(sent[3]), { qos: 1 });
    await c.publishAsync(topic(sensor), JSON.stringify(sent[3]), { qos: 1 });
    expect((await readingsOf(sensor.id)).length).toBe(20);

    // A client that never read its PUBACK resends with the same packet id and DUP set
    // (MQTT 3.1.1 §3.3.1.1, §4.4). The first copy is committed; the resend must not count twice.
    const late = JSON.stringify({
      time: new Date(base.getTime() + 30 * MIN).toISOString(),
      temperature: 21.25,
      humidity: 60,
    });
    const raw1 = await rawConnect(broker.port, `raw-${sensor.id}`, String(sensor.id), sensor.secret);
    raw1.send(publishPacket(topic(sensor), late, 7, false));
    await waitFor(
      () => readingsOf(sensor.id),
      (r) => r.length === 21,
    );
    raw1.destroy(); // the PUBACK, if it came, is never read
    const raw2 = await rawConnect(broker.port, `raw-${sensor.id}`, String(sensor.id), sensor.secret);
    raw2.send(publishPacket(topic(sensor), late, 7, true));
    expect(await raw2.nextPuback()).toBe(7);
    raw2.destroy();

    const rows = await readingsOf(sensor.id);
    expect(rows.length).toBe(21);
    expect(rows.find((r) => r.temperature === 21.25)).toBeTruthy();
    const stored = await storedRollups(spot.id);
    expect(sumN(stored)).toBe(21);
    expectRollupsMatch(stored, await freshRollups(spot.id));
  });
});

describe("MQTT ingest with an outside client (Debian's mosquitto_pub)", () => {
  it("stores a JSON reading and a plain number on a channel topic", async () => {
    const { spot, sensor } = await setup();
    const at = minutesAgo(10);
    const args = [
      "-h",
      "127.0.0.1",
      "-p",
      String(broker.port),
      "-V",
      "mqttv311",
      "-q",
      "1",
      "-u",
      String(sensor.id),
      "-P",
      sensor.secret,
    ];
    // mosquitto_pub with -q 1 waits for the PUBACK before it exits 0.
    await run(
      "/usr/bin/mosquitto_pub",
      [...args, "-t", topic(sensor), "-m", JSON.stringify({ time: at.toISOString(), temperature: 19.5, humidity: 61 })],
      { timeout: 15_000 },
    );
    let rows = await readingsOf(sensor.id);
    expect(rows.map((r) => [iso(r.measured_at), r.temperature, r.humidity])).toEqual([[at.toISOString(), 19.5, 61]]);

    const before = Date.now();
    await run("/usr/bin/mosquitto_pub", [...args, "-t", topic(sensor, "temperature"), "-m", "21.5"], {
      timeout: 15_000,
    });
    rows = await readingsOf(sensor.id);
    expect(rows.length).toBe(2);
    const plain = rows[1];
    // No time in a plain payload: the broker stamps it on receipt (whole seconds).
    expect(plain.temperature).toBe(21.5);
    expect(plain.humidity).toBeNull();
    expect(plain.measured_at.getTime()).toBeGreaterThanOrEqual(Math.floor(before / 1000) * 1000);
    expect(plain.measured_at.getTime()).toBeLessThanOrEqual(Date.now());
    // A channel the sensor did not send stays out of the rollup (no 0 % humidity, no 0 lux).
    const counts = await pool().query<{ t: number; h: number; l: number }>(
      "SELECT sum(t_n)::int AS t, sum(h_n)::int AS h, sum(lux_n)::int AS l FROM hourly_rollups WHERE spot_id = $1",
      [spot.id],
    );
    expect(counts.rows[0]).toEqual({ t: 2, h: 1, l: 0 });
    expectRollupsMatch(await storedRollups(spot.id), await freshRollups(spot.id));
  });
});

describe("MQTT access control", () => {
  it("refuses a wrong secret, an unknown id and a user name that is no sensor id", async () => {
    const { sensor } = await setup();
    // MQTT 3.1.1 §3.2.2.3: CONNACK return code 4 is "bad user name or password".
    const attempts: [string, string][] = [
      [String(sensor.id), "wrong" + sensor.secret],
      ["987654321", sensor.secret],
      ["not-a-number", sensor.secret],
    ];
    for (const [username, password] of attempts) {
      const err = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
        protocolVersion: 4,
        username,
        password,
        reconnectPeriod: 0,
        connectTimeout: 5000,
      }).then(
        (c) => {
          clients.push(c);
          return null;
        },
        (e: Error & { code?: number }) => e,
      );
      expect(err, `${username} must be refused`).not.toBeNull();
      expect(err!.code).toBe(4);
    }
  });

  it("closes a connection that publishes to another sensor's topic and stores nothing", async () => {
    const a = await setup();
    const b = await setup();
    const c = await mqttClient(a.sensor);
    const closed = new Promise<void>((r) => c.once("close", () => r()));
    let acked = false;
    c.publish(topic(b.sensor), JSON.stringify({ temperature: 20, humidity: 50 }), { qos: 1 }, (err) => {
      if (!err) acked = true;
    });
    await closed;
    expect(acked).toBe(false);
    expect(await readingsOf(b.sensor.id)).toEqual([]);
    expect(await readingsOf(a.sensor.id)).toEqual([]);
    const rej = await waitFor(
      () => rejectionsOf(a.sensor.id),
      (r) => r.length === 1,
    );
    expect(rej).toMatchObject([
      { source: "mqtt", topic: topic(b.sensor), reason: "topic not allowed for this sensor" },
    ]);
    expect(sumN(await storedRollups(b.spot.id))).toBe(0);
  });

  it("refuses a subscription to another sensor's topic but allows its own", async () => {
    const a = await setup();
    const b = await setup();
    const own = await mqttClient(a.sensor);
    const granted = await own.subscribeAsync(`nichewise/sensors/${a.sensor.id}/#`, { qos: 1 });
    expect(granted[0].qos).toBe(1);

    const c = await mqttClient(a.sensor);
    const closed = new Promise<"closed">((r) => c.once("close", () => r("closed")));
    // MQTT 3.1.1 §3.9.3 lets a broker answer 0x80 (failure); ours closes the connection instead.
    const outcome = await Promise.race([
      c.subscribeAsync(`nichewise/sensors/${b.sensor.id}/#`, { qos: 1 }).then(
        (g) => (g[0].qos === 128 ? "refused" : "granted"),
        () => "refused",
      ),
      closed,
    ]);
    expect(outcome).not.toBe("granted");
  });

  it("stores and acks a reading without echoing it to the sensor's own subscription; the server's own messages still arrive", async () => {
    const a = await setup();
    const c = await mqttClient(a.sensor);
    await c.subscribeAsync(`nichewise/sensors/${a.sensor.id}/#`, { qos: 1 });
    const received: string[] = [];
    c.on("message", (t) => received.push(t));
    const at = new Date(Math.floor((Date.now() - 60_000) / 1000) * 1000);
    await c.publishAsync(topic(a.sensor), JSON.stringify({ time: at.toISOString(), temperature: 21.5 }), { qos: 1 });
    expect(await readingsOf(a.sensor.id)).toMatchObject([{ measured_at: at, temperature: 21.5 }]);
    // A message the server publishes (no client) is delivered to the subscription as usual.
    await new Promise<void>((resolve, reject) =>
      broker.broker.publish(
        {
          cmd: "publish",
          topic: `nichewise/sensors/${a.sensor.id}/note`,
          payload: Buffer.from("hello"),
          qos: 0,
          retain: false,
          dup: false,
        },
        (err) => (err ? reject(err) : resolve()),
      ),
    );
    await new Promise((r) => setTimeout(r, 200));
    expect(received).toEqual([`nichewise/sensors/${a.sensor.id}/note`]);
  });
});

describe("bad payloads", () => {
  it("acks, records and counts every kind of bad payload, and keeps ingesting", async () => {
    const { spot, sensor } = await setup({ indoor: true });
    const c = await mqttClient(sensor);
    const inAnHour = new Date(Date.now() + HOUR).toISOString();
    const cases: [string, string | Buffer, RegExp][] = [
      ["not JSON", "temperature=20", /not JSON/],
      ["JSON array", "[20, 55]", /not a JSON object/],
      ["unknown fields only", JSON.stringify({ temp_c: 20, rh: 55 }), /no known field/],
      ["NaN string", JSON.stringify({ temperature: "NaN" }), /^temperature:/],
      // Relative humidity is bounded by 100 % (WMO-No. 8, Guide to Instruments, humidity chapter).
      ["humidity 140", JSON.stringify({ temperature: 20, humidity: 140 }), /^humidity: 140 %/],
      ["-80 °C indoors", JSON.stringify({ temperature: -80, humidity: 40 }), /^temperature: -80 °C .* indoor/],
      ["1 h in the future", JSON.stringify({ time: inAnHour, temperature: 20 }), /future/],
      ["empty", "", /empty payload/],
      ["not UTF-8", Buffer.from([0x7b, 0xff, 0xfe, 0x00, 0xc3, 0x28, 0x7d]), /not UTF-8/],
      // Over the payload limit but under the packet limit (MAX_PUBLISH_BYTES): read, acked and recorded.
      ["over 4 KB", JSON.stringify({ temperature: 20, note: "x".repeat(4500) }), /over 4096 bytes/],
    ];
    for (const [i, [name, payload]] of cases.entries()) {
      // QoS 1 acked even when refused: a refused publish would be resent in a loop (common practice).
      await expect(c.publishAsync(topic(sensor), payload, { qos: 1 }), name).resolves.toBeDefined();
      // Rejections are recorded just after the ack; wait so that their order is the order sent.
      await waitFor(
        () => rejectionsOf(sensor.id),
        (r) => r.length === i + 1,
      );
    }
    expect(c.connected).toBe(true);
    const good = minutesAgo(5);
    await c.publishAsync(topic(sensor), JSON.stringify({ time: good.toISOString(), temperature: 22.5, humidity: 58 }), {
      qos: 1,
    });

    const rows = await readingsOf(sensor.id);
    expect(rows.map((r) => [iso(r.measured_at), r.temperature])).toEqual([[good.toISOString(), 22.5]]);
    const rej = await waitFor(
      () => rejectionsOf(sensor.id),
      (r) => r.length === cases.length,
    );
    expect(rej.length).toBe(cases.length);
    cases.forEach(([name, , reason], i) => {
      expect(rej[i].reason, name).toMatch(reason);
      expect(rej[i].source).toBe("mqtt");
      expect(rej[i].topic).toBe(topic(sensor));
    });
    expect(
      await waitFor(
        () => rejectedCount(sensor.id),
        (n) => n === cases.length,
      ),
    ).toBe(cases.length);
    // Refused messages leave the rollups alone: one hour, one reading.
    const stored = await storedRollups(spot.id);
    expect(stored.map((r) => [r.n, r.tmin, r.tmax])).toEqual([[1, 22.5, 22.5]]);
  });
});

describe("out-of-order and late readings", () => {
  type Case = { time: string | number; temperature: number; hour: string };

  async function sendAndCheck(timeZone: string, cases: Case[]) {
    const { spot, sensor } = await setup({ timeZone });
    const c = await mqttClient(sensor);
    for (const k of cases)
      await c.publishAsync(topic(sensor), JSON.stringify({ time: k.time, temperature: k.temperature }), { qos: 1 });
    expect((await readingsOf(sensor.id)).length).toBe(cases.length);
    const expected = new Map<string, number[]>();
    for (const k of cases) expected.set(k.hour, [...(expected.get(k.hour) ?? []), k.temperature]);
    const stored = await storedRollups(spot.id);
    expect(stored.map((r) => [iso(r.hour), r.n, r.tmin, r.tmax])).toEqual(
      [...expected.entries()]
        .sort(([a], [b]) => a.localeCompare(b))
        .map(([h, ts]) => [h, ts.length, Math.min(...ts), Math.max(...ts)]),
    );
    return { spot, sensor };
  }

  it("files readings sent out of order, days late and across both UK clock changes under their own local hour", async () => {
    const day = minutesAgo(3 * 24 * 60);
    const h0 = new Date(Math.floor(day.getTime() / HOUR) * HOUR); // late November: GMT, local hour = UTC hour
    const at = (m: number) => new Date(h0.getTime() + m * MIN).toISOString();
    const hourOf = (m: number) => new Date(h0.getTime() + Math.floor(m / 60) * HOUR).toISOString();
    // UK summer time ends on the last Sunday of October at 01:00 UTC and begins on the last Sunday
    // of March at 01:00 UTC (Summer Time Order 2002; EU Directive 2000/84/EC): 2025-10-26, 2025-03-30.
    await sendAndCheck("Europe/London", [
      { time: at(105), temperature: 15.5, hour: hourOf(105) },
      { time: at(45), temperature: 14.5, hour: hourOf(45) },
      { time: at(130), temperature: 16, hour: hourOf(130) },
      { time: at(5), temperature: 14, hour: hourOf(5) },
      { time: at(80), temperature: 15, hour: hourOf(80) },
      // 01:30 BST, the first of the two 01:30s: its local hour began at 00:00 UTC (01:00 BST).
      { time: "2025-10-26T01:30:00+01:00", temperature: 11, hour: "2025-10-26T00:00:00.000Z" },
      { time: "2025-10-26T00:59:59Z", temperature: 11.5, hour: "2025-10-26T00:00:00.000Z" },
      // 01:30 GMT, the second 01:30: a different hour that began at 01:00 UTC (01:00 GMT).
      { time: "2025-10-26T01:30:00Z", temperature: 10, hour: "2025-10-26T01:00:00.000Z" },
      { time: "2025-10-26T01:00:00Z", temperature: 10.5, hour: "2025-10-26T01:00:00.000Z" },
      // Spring: 00:30 GMT, then 02:30 BST (01:00–02:00 never happened on the wall).
      { time: "2025-03-30T00:30:00Z", temperature: 6, hour: "2025-03-30T00:00:00.000Z" },
      { time: "2025-03-30T01:30:00Z", temperature: 7, hour: "2025-03-30T01:00:00.000Z" },
    ]);
  });

  it("files readings under half-hour local hours in Asia/Kolkata (UTC+05:30)", async () => {
    // India Standard Time is UTC+05:30 all year (IANA tz database, Asia/Kolkata): local hours start at :30 UTC.
    const d = minutesAgo(2 * 24 * 60);
    const h0 = new Date(Math.floor(d.getTime() / HOUR) * HOUR);
    const utc = (m: number) => new Date(h0.getTime() + m * MIN);
    const { spot } = await sendAndCheck("Asia/Kolkata", [
      { time: utc(40).toISOString(), temperature: 27, hour: utc(30).toISOString() },
      { time: utc(29).toISOString(), temperature: 26, hour: utc(-30).toISOString() },
      { time: Math.floor(utc(30).getTime() / 1000), temperature: 26.5, hour: utc(30).toISOString() }, // epoch seconds
      { time: "2025-06-01T15:40:00+05:30", temperature: 31, hour: "2025-06-01T09:30:00.000Z" },
      { time: "2025-06-01T10:29:59Z", temperature: 32, hour: "2025-06-01T09:30:00.000Z" },
      { time: "2025-06-01T10:30:00Z", temperature: 33, hour: "2025-06-01T10:30:00.000Z" },
    ]);
    expectRollupsMatch(await storedRollups(spot.id), await freshRollups(spot.id));
  });
});

describe("HTTP ingest", () => {
  const post = (auth: string, body: string) =>
    handleHttpIngest(
      new Request("http://x/api/ingest", {
        method: "POST",
        headers: { Authorization: auth, "Content-Type": "application/json" },
        body,
      }),
    );

  it("takes 10,000 readings in one POST, names each refused one, and stores nothing new on a resend", async () => {
    const { spot, sensor } = await setup();
    const auth = `Bearer ${sensor.id}.${sensor.secret}`;
    const base = minutesAgo(10_000 + 10);
    const bad = new Map<number, [unknown, RegExp]>([
      [17, [{ time: new Date(base.getTime() + 17 * MIN).toISOString(), temperature: 20, humidity: 140 }, /^humidity/]],
      [404, [{ time: new Date(base.getTime() + 404 * MIN).toISOString(), temperature: -80 }, /^temperature/]],
      [5000, [{ time: new Date(Date.now() + HOUR).toISOString(), temperature: 20 }, /future/]],
      [7777, [{ time: "yesterday", temperature: 20 }, /^time/]],
      [9998, [[1, 2], /not a JSON object/]],
      [9999, [{ colour: "green" }, /no known field/]],
    ]);
    const items = Array.from(
      { length: 10_000 },
      (_, i) =>
        bad.get(i)?.[0] ?? {
          time: new Date(base.getTime() + i * MIN).toISOString(),
          temperature: 15 + (i % 100) / 10,
          humidity: 40 + (i % 50),
        },
    );
    const body = JSON.stringify({ readings: items });
    const started = performance.now();
    const res = await post(auth, body);
    const ms = performance.now() - started;
    expect(res.status).toBe(200);
    const out = (await res.json()) as {
      received: number;
      accepted: number;
      stored: number;
      duplicates: number;
      rejected: { index: number; reason: string }[];
    };
    expect(out).toMatchObject({
      received: 10_000,
      accepted: 10_000 - bad.size,
      stored: 10_000 - bad.size,
      duplicates: 0,
    });
    expect(out.rejected.map((r) => r.index)).toEqual([...bad.keys()]);
    for (const r of out.rejected) expect(r.reason, `item ${r.index}`).toMatch(bad.get(r.index)![1]);
    console.log(`[ingest] 10,000-reading HTTP batch committed in ${ms.toFixed(0)} ms`);

    const again = (await (await post(auth, body)).json()) as typeof out;
    expect(again).toMatchObject({ accepted: 10_000 - bad.size, stored: 0, duplicates: 10_000 - bad.size });
    expect((await readingsOf(sensor.id)).length).toBe(10_000 - bad.size);
    const stored = await storedRollups(spot.id);
    expect(sumN(stored)).toBe(10_000 - bad.size);
    expectRollupsMatch(stored, await freshRollups(spot.id));
    expect(
      await waitFor(
        () => rejectedCount(sensor.id),
        (n) => n === 2 * bad.size,
      ),
    ).toBe(2 * bad.size);
  });

  it("answers 401 to a wrong token and 413 to a body or batch over the limit", async () => {
    const { sensor } = await setup();
    const one = JSON.stringify({ temperature: 20 });
    expect((await post(`Bearer ${sensor.id}.wrong${sensor.secret}`, one)).status).toBe(401);
    expect((await post(`Bearer 987654321.${sensor.secret}`, one)).status).toBe(401);
    expect((await post(`Basic ${sensor.id}:${sensor.secret}`, one)).status).toBe(401);
    expect((await post("", one)).status).toBe(401);

    const auth = `Bearer ${sensor.id}.${sensor.secret}`;
    const huge = JSON.stringify({ readings: [{ temperature: 20, note: "x".repeat(MAX_HTTP_BYTES) }] });
    expect((await post(auth, huge)).status).toBe(413);
    const tooMany = JSON.stringify(Array.from({ length: 10_001 }, () => ({ temperature: 20 })));
    expect((await post(auth, tooMany)).status).toBe(413);
    expect(await readingsOf(sensor.id)).toEqual([]);
  });
});

describe("moving a sensor", () => {
  it("splits readings between the two spots at the move, and both spots' rollups match the raw readings", async () => {
    const user = await makeUser();
    const site = await makeSite(user);
    const a = await makeSpot(site, { name: "Old shelf" });
    const b = await makeSpot(site, { name: "New shelf" });
    const sensor = await makeSensor(site, a);
    const w = new ReadingWriter();
    const start = new Date(Math.floor(minutesAgo(4 * 24 * 60).getTime() / HOUR) * HOUR);
    const series: Reading[] = Array.from({ length: 48 * 6 }, (_, i) => ({
      sensorId: sensor.id,
      measuredAt: new Date(start.getTime() + i * 10 * MIN),
      temperature: 12 + (i % 30) / 3,
      humidity: 50 + (i % 20),
      lux: null,
      battery: 90,
    }));
    await w.write(series);
    const moveAt = new Date(start.getTime() + 24 * HOUR + 25 * MIN); // mid-hour, so one hour is split
    await placeSensor({ siteId: site.id, sensorId: sensor.id, spotId: b.id, at: moveAt, actorId: user.id });

    const beforeMove = series.filter((r) => r.measuredAt < moveAt).length;
    expect(sumN(await storedRollups(a.id))).toBe(beforeMove);
    expect(sumN(await storedRollups(b.id))).toBe(series.length - beforeMove);

    // Late readings after the move belong to the spot the sensor was in at their own time.
    await w.write([
      {
        sensorId: sensor.id,
        measuredAt: new Date(moveAt.getTime() - 7 * MIN),
        temperature: 30,
        humidity: 70,
        lux: null,
        battery: 90,
      },
      {
        sensorId: sensor.id,
        measuredAt: new Date(moveAt.getTime() + 3 * MIN),
        temperature: 5,
        humidity: 90,
        lux: null,
        battery: 90,
      },
    ]);
    const splitHour = new Date(start.getTime() + 24 * HOUR).toISOString();
    const sa = await storedRollups(a.id);
    const sb = await storedRollups(b.id);
    expect(sumN(sa)).toBe(beforeMove + 1);
    expect(sumN(sb)).toBe(series.length - beforeMove + 1);
    expect(sa.find((r) => iso(r.hour) === splitHour)).toMatchObject({ n: 3 + 1, tmax: 30 }); // :00, :10, :20 and the late :18
    expect(sb.find((r) => iso(r.hour) === splitHour)).toMatchObject({ n: 3 + 1, tmin: 5 }); // :30, :40, :50 and the late :28
    expectRollupsMatch(sa, await freshRollups(a.id));
    expectRollupsMatch(sb, await freshRollups(b.id));
  });
});

describe("one group commit shared by several callers", () => {
  it("tells each write() how many of its own readings were new, also beside store() callers that skip the count", async () => {
    const { spot, sensor } = await setup();
    const w = new ReadingWriter(undefined, 50); // a 50 ms window, so all five calls share one commit
    const at = (k: number) => ({
      sensorId: sensor.id,
      measuredAt: minutesAgo(300 - k),
      temperature: 20,
      humidity: 50,
      lux: null,
      battery: null,
    });
    await w.write([at(0), at(1)]);
    const batches = w.stats.batches;
    const [a, , b, , c] = await Promise.all([
      w.write([at(0), at(2)]), // one already stored
      w.store([at(3)]),
      w.write([at(4), at(5), at(1)]),
      w.store([at(6), at(0)]),
      w.write([at(0), at(1)]), // nothing new
    ]);
    expect(w.stats.batches - batches).toBe(1);
    expect([a.inserted, b.inserted, c.inserted]).toEqual([1, 2, 0]);
    expect(await readingsOf(sensor.id)).toHaveLength(7);
    expect(sumN(await storedRollups(spot.id))).toBe(7);
    // Only store() callers: the commit lists no inserted keys and still stores each reading once.
    await Promise.all([w.store([at(7), at(8)]), w.store([at(8), at(9)])]);
    expect(await readingsOf(sensor.id)).toHaveLength(10);
    expect(sumN(await storedRollups(spot.id))).toBe(10);
  });
});

describe("a large batch of one sensor, written as two halves at once", () => {
  // Europe/London leaves summer time on 2025-10-26 at 01:00 UTC (Summer Time Order 2002); India
  // Standard Time is UTC+05:30 all year, so its local hours start at :30 UTC (IANA tz database).
  for (const timeZone of ["Europe/London", "Asia/Kolkata"]) {
    it(
      `${timeZone}: each reading stored once, rollups equal an ` +
        `aggregation of raw rows, one ordered batch for the alerts, the ` +
        `sensor row from the whole batch`,
      async () => {
        const user = await makeUser();
        const site = await makeSite(user, { timeZone });
        const spot = await makeSpot(site);
        const sensor = await makeSensor(site, spot);
        const w = new ReadingWriter();
        const batches: CommittedReading[][] = [];
        w.onBatch((rows) => void batches.push(rows));
        const start = Date.UTC(2025, 9, 22, 12, 17);
        const readings: Reading[] = Array.from({ length: 10_000 }, (_, k) => ({
          sensorId: sensor.id,
          measuredAt: new Date(start + k * MIN),
          temperature: 10 + (k % 50) / 10,
          humidity: 60 + (k % 20),
          lux: null,
          battery: k < 3000 ? 80 - Math.floor(k / 1000) : null, // battery only in the earlier half
        }));
        // Resent readings from around the middle, at the end: the batch arrives out of order.
        const res = await w.write([...readings, ...readings.slice(4990, 5010)]);
        expect(res.inserted).toBe(10_000);
        expect(w.stats.splitBatches).toBe(1);
        await new Promise((r) => setImmediate(r));
        expect(batches.map((b) => b.length)).toEqual([10_000]);
        expect(batches[0].every((r, i) => i === 0 || r.measuredAt >= batches[0][i - 1].measuredAt)).toBe(true);
        const stored = await storedRollups(spot.id);
        expect(sumN(stored)).toBe(10_000);
        expectRollupsMatch(stored, await freshRollups(spot.id));
        const row = (await pool().query("SELECT last_seen_at, battery FROM sensors WHERE id = $1", [sensor.id]))
          .rows[0];
        expect(row.last_seen_at.getTime()).toBe(start + 9_999 * MIN);
        expect(row.battery).toBe(78);
        // The same batch again stores nothing and tells the alerts nothing.
        expect((await w.write(readings)).inserted).toBe(0);
        await new Promise((r) => setImmediate(r));
        expect(batches).toHaveLength(1);

        // Single-channel readings (plain-number topics) take the merging statement: humidity sent on
        // its own for the same instants fills the rows' humidity once.
        const later = start + 20_000 * MIN;
        const temps: Reading[] = readings.map((r, k) => ({
          ...r,
          measuredAt: new Date(later + k * MIN),
          humidity: null,
          battery: null,
          partial: true,
        }));
        const hums: Reading[] = readings.map((r, k) => ({
          ...r,
          measuredAt: new Date(later + k * MIN),
          temperature: null,
          battery: null,
          partial: true,
        }));
        expect((await w.write(temps)).inserted).toBe(10_000);
        await w.write(hums);
        await w.write(hums);
        expect(w.stats.splitBatches).toBe(5);
        const merged = await storedRollups(spot.id);
        expect(sumN(merged)).toBe(20_000);
        expectRollupsMatch(merged, await freshRollups(spot.id));
      },
    );
  }
});

describe("rollups against an independent aggregation", () => {
  async function writeSimulatedMonth(from: Date, to: Date, timeZone: string) {
    const user = await makeUser();
    const site = await makeSite(user, { timeZone });
    const spot = await makeSpot(site, { name: "Kitchen sill" });
    const sensor = await makeSensor(site, spot);
    const sim = [
      ...generate({ ...DEMO_SITE, timeZone }, { kind: "windowsill", facing: "E", hasLight: true }, DEMO_SCENARIO, {
        from,
        to,
        intervalMs: 5 * MIN,
        sensorSeed: 102,
        artifacts: true,
      }),
    ];
    const readings: Reading[] = sim.map((r) => ({
      sensorId: sensor.id,
      measuredAt: r.measuredAt,
      temperature: r.temperature,
      humidity: r.humidity,
      lux: r.lux ?? null,
      battery: r.battery,
    }));
    const distinct = new Set(readings.map((r) => r.measuredAt.getTime())).size;
    // Artifacts: the simulator sends some readings twice and swaps neighbours, as a radio link does.
    expect(readings.length).toBeGreaterThan(distinct);
    expect(readings.some((r, i) => i > 0 && r.measuredAt < readings[i - 1].measuredAt)).toBe(true);

    // Many small writes in flight at once, so the writer groups several callers into one commit.
    const w = new ReadingWriter();
    const chunk = 97;
    const writes: Promise<{ inserted: number }>[] = [];
    for (let i = 0; i < readings.length; i += chunk) writes.push(w.write(readings.slice(i, i + chunk)));
    const inserted = (await Promise.all(writes)).reduce((s, r) => s + r.inserted, 0);
    expect(inserted).toBe(distinct);
    expect(w.stats.batches).toBeLessThan(writes.length);
    return { spot, sensor, sim, distinct };
  }

  it("June of the demo site: stored rollups equal freshRollups", async () => {
    const { spot, distinct } = await writeSimulatedMonth(
      new Date("2025-06-01T00:00:00Z"),
      new Date("2025-07-01T00:00:00Z"),
      "Europe/London",
    );
    const stored = await storedRollups(spot.id);
    expect(sumN(stored)).toBe(distinct);
    expectRollupsMatch(stored, await freshRollups(spot.id));
  });

  it("a month across the autumn clock change: stored rollups equal an aggregation done in JavaScript with Intl", async () => {
    const timeZone = "Europe/London";
    const { spot, sim, distinct } = await writeSimulatedMonth(
      new Date("2025-10-12T00:00:00Z"),
      new Date("2025-11-11T00:00:00Z"),
      timeZone,
    );
    // Local minute and second from ICU's copy of the IANA tz database; the local hour began that long before.
    const fmt = new Intl.DateTimeFormat("en-GB", { timeZone, minute: "2-digit", second: "2-digit" });
    const hourStart = (d: Date) => {
      const p = Object.fromEntries(fmt.formatToParts(d).map((x) => [x.type, x.value]));
      return d.getTime() - (Number(p.minute) * 60 + Number(p.second)) * 1000 - d.getMilliseconds();
    };
    const seen = new Set<number>();
    const agg = new Map<number, { n: number; tmin: number; tmax: number; tsum: number; hsum: number }>();
    for (const r of sim) {
      if (seen.has(r.measuredAt.getTime())) continue;
      seen.add(r.measuredAt.getTime());
      const t = Math.fround(r.temperature); // stored as real (float4)
      const k = hourStart(r.measuredAt);
      const a = agg.get(k) ?? { n: 0, tmin: Infinity, tmax: -Infinity, tsum: 0, hsum: 0 };
      agg.set(k, {
        n: a.n + 1,
        tmin: Math.min(a.tmin, t),
        tmax: Math.max(a.tmax, t),
        tsum: a.tsum + t,
        hsum: a.hsum + Math.fround(r.humidity),
      });
    }
    const expected = [...agg.entries()].sort(([x], [y]) => x - y);
    // The hour clocks go back is two local hours 01:00 (BST, then GMT): two rollup rows, one UTC hour apart.
    const keys = expected.map(([k]) => new Date(k).toISOString());
    expect(keys).toContain("2025-10-26T00:00:00.000Z");
    expect(keys).toContain("2025-10-26T01:00:00.000Z");
    const stored = await storedRollups(spot.id);
    expect(sumN(stored)).toBe(distinct);
    expect(stored.map((r) => [iso(r.hour), r.n])).toEqual(expected.map(([k, a]) => [new Date(k).toISOString(), a.n]));
    stored.forEach((s, i) => {
      const a = expected[i][1];
      expect(Math.abs(s.tmin - a.tmin)).toBeLessThan(1e-3);
      expect(Math.abs(s.tmax - a.tmax)).toBeLessThan(1e-3);
      expect(Math.abs(s.tsum - a.tsum)).toBeLessThan(1e-3);
      expect(Math.abs(s.hsum - a.hsum)).toBeLessThan(1e-3);
    });
  });
});

describe("CSV import", () => {
  it("reads °F and naive New York times from a BOM + CRLF file, and a second import stores nothing", async () => {
    const { spot, sensor } = await setup({ timeZone: "America/New_York", indoor: false });
    const text =
      "\uFEFFTimestamp,Temperature (°F),Humidity (%)\r\n" +
      "2025-01-15 08:00,68,45\r\n" +
      "2025-01-15 08:30,32,50\r\n" +
      "2025-01-16 06:00,-40,70\r\n" +
      "2025-07-15 08:00,86,60\r\n" +
      "2025-07-15 14:15,71.6,55\r\n";
    const { headers, rows } = parseCsv(new TextEncoder().encode(text));
    expect(headers).toEqual(["Timestamp", "Temperature (°F)", "Humidity (%)"]);
    const mapping = { ...guessMapping(headers), dateFormat: "iso" as const, timeZone: "America/New_York" };
    expect(mapping).toMatchObject({ timestamp: 0, temperature: 1, humidity: 2, unit: "F" });

    const first = await importCsv(rows, mapping, sensor.id);
    expect(first).toMatchObject({ rows: 5, valid: 5, stored: 5, failed: 0 });
    const second = await importCsv(rows, mapping, sensor.id);
    expect(second).toMatchObject({ rows: 5, valid: 5, stored: 0, duplicates: 5 });

    // °C = (°F − 32) × 5/9 (NIST SP 811, B.8); −40 °F is −40 °C. New York keeps EST (UTC−5) in
    // winter and EDT (UTC−4) from the second Sunday of March (US Energy Policy Act of 2005).
    const expected: [string, number, number][] = [
      ["2025-01-15T13:00:00.000Z", 20, 45],
      ["2025-01-15T13:30:00.000Z", 0, 50],
      ["2025-01-16T11:00:00.000Z", -40, 70],
      ["2025-07-15T12:00:00.000Z", 30, 60],
      ["2025-07-15T18:15:00.000Z", 22, 55],
    ];
    const stored = await readingsOf(sensor.id);
    expect(stored.length).toBe(expected.length);
    stored.forEach((r, i) => {
      expect(iso(r.measured_at)).toBe(expected[i][0]);
      expect(Math.abs(r.temperature! - expected[i][1])).toBeLessThan(1e-4);
      expect(r.humidity).toBe(expected[i][2]);
    });
    const roll = await storedRollups(spot.id);
    expect(roll.map((r) => [iso(r.hour), r.n])).toEqual([
      ["2025-01-15T13:00:00.000Z", 2],
      ["2025-01-16T11:00:00.000Z", 1],
      ["2025-07-15T12:00:00.000Z", 1],
      ["2025-07-15T18:00:00.000Z", 1],
    ]);
    expectRollupsMatch(roll, await freshRollups(spot.id));
  });

  it("imports a file of several 10,000-row batches with bad rows on both sides of a batch's edge, and reports their lines", async () => {
    const { spot, sensor } = await setup();
    const start = Date.UTC(2025, 2, 1);
    // 25,000 data rows (file lines 2–25,001). Rows 10,000 and 10,001 straddle the first batch's
    // edge (file lines 10,001 and 10,002); row 24,999 is the file's last line.
    const bad = new Set([0, 9_999, 10_000, 20_500, 24_999]);
    const rows = Array.from({ length: 25_000 }, (_, k) => [
      bad.has(k) ? "not a time" : new Date(start + k * 60_000).toISOString(),
      "21.5",
      "55",
    ]);
    const mapping = {
      timestamp: 0,
      temperature: 1,
      humidity: 2,
      lux: null,
      unit: "C" as const,
      dateFormat: "iso" as const,
      timeZone: "UTC",
    };
    const first = await importCsv(rows, mapping, sensor.id);
    expect(first).toMatchObject({ rows: 25_000, valid: 24_995, stored: 24_995, duplicates: 0, failed: 5 });
    expect(first.firstFailures.map((f) => f.line)).toEqual([2, 10_001, 10_002, 20_502, 25_001]);
    const again = await importCsv(rows, mapping, sensor.id);
    expect(again).toMatchObject({ valid: 24_995, stored: 0, duplicates: 24_995, failed: 5 });
    expect((await readingsOf(sensor.id)).length).toBe(24_995);
    expectRollupsMatch(await storedRollups(spot.id), await freshRollups(spot.id));
  });

  it("stops at a batch the database refuses, says at which line, keeps what came before, and a second import adds the rest", async () => {
    const { spot, sensor } = await setup();
    const start = Date.UTC(2025, 4, 1);
    const rows = Array.from({ length: 25_000 }, (_, k) => [new Date(start + k * 60_000).toISOString(), "20.5", "60"]);
    const mapping = {
      timestamp: 0,
      temperature: 1,
      humidity: 2,
      lux: null,
      unit: "C" as const,
      dateFormat: "iso" as const,
      timeZone: "UTC",
    };
    // A real refusal from PostgreSQL, for this sensor's rows of the second batch (rows 10,000–19,999) only.
    const cut = new Date(start + 12_000 * 60_000).toISOString();
    await pool().query(`CREATE FUNCTION refuse_csv_test_${sensor.id}() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        IF NEW.sensor_id = ${sensor.id} AND NEW.measured_at >= '${cut}' THEN RAISE EXCEPTION 'disk full (test)'; END IF;
        RETURN NEW;
      END $$`);
    await pool().query(
      `CREATE TRIGGER refuse_csv_test_${sensor.id} BEFORE INSERT ON readings FOR EACH ROW EXECUTE FUNCTION refuse_csv_test_${sensor.id}()`,
    );
    let first;
    try {
      first = await importCsv(rows, mapping, sensor.id);
    } finally {
      await pool().query(`DROP TRIGGER refuse_csv_test_${sensor.id} ON readings`);
      await pool().query(`DROP FUNCTION refuse_csv_test_${sensor.id}()`);
    }
    expect(first).toMatchObject({ rows: 25_000, stored: 10_000, duplicates: 0, failed: 0 });
    expect(first.stopped).toMatchObject({ line: 10_002 });
    expect(first.stopped!.reason).toContain("disk full (test)");
    expect((await readingsOf(sensor.id)).length).toBe(10_000);
    expectRollupsMatch(await storedRollups(spot.id), await freshRollups(spot.id));

    const again = await importCsv(rows, mapping, sensor.id);
    expect(again).toMatchObject({ valid: 25_000, stored: 15_000, duplicates: 10_000, stopped: null });
    expect((await readingsOf(sensor.id)).length).toBe(25_000);
    expectRollupsMatch(await storedRollups(spot.id), await freshRollups(spot.id));
  });
});
