// What ingest tells a sensor and the grower about readings it cannot store as sent: an id no sensor
// can have is a wrong token (401), not an outage; a rejection is recorded whatever bytes its text
// holds, and the counts match the rows; subnormal numbers, impossible jumps and conflicting
// duplicates are named as such; readings stored outside any placement of the sensor are counted.
import { connectAsync, type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { CONFLICT_REASON } from "~/.server/ingest/message";
import { handleHttpIngest } from "~/.server/ingest/http";
import { recordRejections } from "~/.server/ingest/rejections";
import { ReadingWriter } from "~/.server/ingest/writer";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const MIN = 60_000;
let broker: RunningBroker;
const clients: MqttClient[] = [];

beforeAll(async () => {
  broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer: new ReadingWriter(), log: () => {} });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => {})));
  await broker?.close();
});

async function setup(placedFrom?: Date, indoor = true) {
  const site = await makeSite(await makeUser());
  const spot = await makeSpot(site, { indoor });
  return makeSensor(site, spot, placedFrom);
}

const post = (auth: string, body: unknown) =>
  handleHttpIngest(
    new Request("http://x/api/ingest", {
      method: "POST",
      headers: { Authorization: auth, "Content-Type": "application/json" },
      body: JSON.stringify(body),
    }),
  );

type Answer = {
  received: number;
  accepted: number;
  stored: number;
  duplicates: number;
  conflicts: number;
  conflicting: { index: number; time: string; reason: string }[];
  outsideSpot: number;
  message?: string;
  rejected: { index: number; reason: string }[];
};
const answer = async (res: Response) => (await res.json()) as Answer;

async function mqttClient(sensor: { id: number; secret: string }) {
  const c = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
    protocolVersion: 4,
    username: String(sensor.id),
    password: sensor.secret,
    clientId: `trust-${sensor.id}`,
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  clients.push(c);
  return c;
}

const rows = async (sensorId: number) =>
  (
    await pool().query<{ measured_at: Date; temperature: number | null }>(
      "SELECT measured_at, temperature FROM readings WHERE sensor_id = $1 ORDER BY measured_at",
      [sensorId],
    )
  ).rows;
const rejections = async (sensorId: number) =>
  (
    await pool().query<{ reason: string; topic: string | null; payload: string }>(
      "SELECT reason, topic, payload FROM rejected_messages WHERE sensor_id = $1 ORDER BY id",
      [sensorId],
    )
  ).rows;
const rejectedCount = async (sensorId: number) =>
  (await pool().query<{ n: number }>("SELECT rejected_count AS n FROM sensors WHERE id = $1", [sensorId])).rows[0].n;

async function until<T>(probe: () => Promise<T>, ok: (v: T) => boolean): Promise<T> {
  for (let i = 0; ; i++) {
    const v = await probe();
    if (ok(v) || i > 200) return v;
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** Whole minutes before now. */
const minutesAgo = (m: number) => new Date(Math.floor((Date.now() - m * MIN) / MIN) * MIN);

describe("malformed sensor ids", () => {
  it("answers 401, not 503, to ids no sensor can have, so a misconfigured sensor stops instead of retrying", async () => {
    for (const id of ["99999999999", "2147483648", "0", "00", "1".repeat(400)]) {
      const res = await post(`Bearer ${id}.x`, { temperature: 20 });
      expect(res.status, id).toBe(401);
    }
    // The same over MQTT: CONNACK 4, bad user name or password (MQTT 3.1.1 §3.2.2.3), not 3 (server unavailable).
    const code = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
      protocolVersion: 4,
      username: "99999999999",
      password: "x",
      reconnectPeriod: 0,
      connectTimeout: 5000,
    }).then(
      (c) => (c.end(true), 0),
      (e: { code?: number }) => e.code,
    );
    expect(code).toBe(4);
  });
});

describe("recording rejections", () => {
  it("records every rejection of a call when one holds a NUL byte in its reason or topic, and the counts match the rows", async () => {
    const sensor = await setup();
    await recordRejections([
      {
        sensorId: sensor.id,
        source: "mqtt",
        topic: `nichewise/sensors/${sensor.id}/reading`,
        reason: "fine",
        payload: "{}",
      },
      {
        sensorId: sensor.id,
        source: "mqtt",
        topic: `nichewise/sensors/${sensor.id}/read\u0000ing`,
        reason: "topic not allowed for this sensor",
        payload: "",
      },
      { sensorId: sensor.id, source: "http", reason: `time: bad \u0000 value${"x".repeat(1000)}`, payload: "a\u0000b" },
    ]);
    const rec = await rejections(sensor.id);
    expect(rec.length).toBe(3);
    expect(rec[1].topic).toBe(`nichewise/sensors/${sensor.id}/read\\0ing`);
    expect(rec[2].reason.startsWith("time: bad \\0 value")).toBe(true);
    expect(rec[2].reason.length).toBeLessThanOrEqual(300);
    expect(rec[2].payload).toBe("a\\0b");
    expect(await rejectedCount(sensor.id)).toBe(rec.length);
  });

  it("a NUL in a topic sent over MQTT is recorded with the sensor's other rejections", async () => {
    const sensor = await setup();
    const c = await mqttClient(sensor);
    await c.publishAsync(`nichewise/sensors/${sensor.id}/reading`, "not json", { qos: 1 });
    // Publishing outside its own topics closes the connection (and is recorded).
    c.publish(`nichewise/sensors/${sensor.id}/x\u0000y`, "20", { qos: 1 });
    const rec = await until(
      () => rejections(sensor.id),
      (r) => r.length === 2,
    );
    expect(rec.map((r) => r.reason)).toEqual(["payload is not JSON", "topic not allowed for this sensor"]);
    expect(rec[1].topic).toBe(`nichewise/sensors/${sensor.id}/x\\0y`);
    expect(
      await until(
        () => rejectedCount(sensor.id),
        (n) => n === 2,
      ),
    ).toBe(2);
  });
});

describe("faulty values", () => {
  it("refuses 5e-324 instead of storing 0 °C", async () => {
    const sensor = await setup();
    const at = minutesAgo(10).toISOString();
    const out = await answer(
      await post(`Bearer ${sensor.id}.${sensor.secret}`, [{ time: at, temperature: 5e-324, humidity: 50 }]),
    );
    expect(out).toMatchObject({ accepted: 0, stored: 0 });
    expect(out.rejected[0].reason).toMatch(/^temperature: a subnormal number/);
    expect(await rows(sensor.id)).toEqual([]);
  });

  it("over HTTP: a second reading for a stored time with a different value is a conflict, the same value a duplicate", async () => {
    const sensor = await setup();
    const auth = `Bearer ${sensor.id}.${sensor.secret}`;
    const t = minutesAgo(30).toISOString();
    const t2 = minutesAgo(29).toISOString();
    expect(await answer(await post(auth, [{ time: t, temperature: 20, humidity: 50 }]))).toMatchObject({
      stored: 1,
      duplicates: 0,
      conflicts: 0,
    });
    const again = await answer(
      await post(auth, [
        { time: t, temperature: 20, humidity: 50 },
        { time: t, temperature: 21.5, humidity: 50 },
        { time: t2, temperature: 20.5 },
      ]),
    );
    expect(again).toMatchObject({ received: 3, stored: 1, duplicates: 1, conflicts: 1 });
    // Every reading received is accepted or rejected: the one that conflicts within the request was valid.
    expect(again.accepted + again.rejected.length).toBe(again.received);
    expect(again.conflicting).toEqual([
      {
        index: 1,
        time: t,
        reason: expect.stringMatching(/different reading for the same time earlier in this request/),
      },
    ]);
    const third = await answer(await post(auth, [{ time: t, temperature: 19 }]));
    expect(third).toMatchObject({ stored: 0, duplicates: 0, conflicts: 1 });
    expect(third.conflicting).toEqual([{ index: 0, time: t, reason: expect.stringMatching(/already stored/) }]);
    expect((await rows(sensor.id)).map((r) => r.temperature)).toEqual([20, 20.5]);
  });

  it("over MQTT: a conflicting duplicate is acked and recorded as such; a jump no sensor makes is refused with its reason", async () => {
    const sensor = await setup(undefined, false); // outdoors, where 64.4 °C is within what the spot can see
    const c = await mqttClient(sensor);
    const topic = `nichewise/sensors/${sensor.id}/reading`;
    const t0 = minutesAgo(20);
    const at = (s: number) => new Date(t0.getTime() + s * 1000).toISOString();
    await c.publishAsync(topic, JSON.stringify({ time: at(0), temperature: 18 }), { qos: 1 });
    await c.publishAsync(topic, JSON.stringify({ time: at(0), temperature: 18 }), { qos: 1 }); // a resend
    await c.publishAsync(topic, JSON.stringify({ time: at(0), temperature: 18.7 }), { qos: 1 }); // a conflict
    // A °F sensor without its unit: 64.4 °F is 18 °C, read as °C it is 46 °C up in a minute.
    await c.publishAsync(topic, JSON.stringify({ time: at(60), temperature: 64.4 }), { qos: 1 });
    await c.publishAsync(topic, JSON.stringify({ time: at(120), temperature: 18.3 }), { qos: 1 });
    await c.publishAsync(topic, JSON.stringify({ time: at(180), temperature: 64.4, unit: "F" }), { qos: 1 });
    expect((await rows(sensor.id)).map((r) => r.temperature)).toEqual([18, 18.3, 18]);
    const rec = await until(
      () => rejections(sensor.id),
      (r) => r.length === 2,
    );
    // A jump is refused as it is read, a conflict once the write has seen the stored row: either may be recorded first.
    expect(rec.map((r) => r.reason).sort()).toEqual([
      CONFLICT_REASON,
      expect.stringMatching(/^temperature: 18 → 64\.4 °C in 60 s is a jump no sensor makes/),
    ]);
    expect(
      await until(
        () => rejectedCount(sensor.id),
        (n) => n === 2,
      ),
    ).toBe(2);
  });
});

describe("readings outside any placement", () => {
  it("the HTTP answer counts readings stored before the sensor's placement and says where to assign them", async () => {
    const placedFrom = minutesAgo(60);
    const sensor = await setup(placedFrom);
    const auth = `Bearer ${sensor.id}.${sensor.secret}`;
    const before = [120, 119, 118].map((m) => ({ time: minutesAgo(m).toISOString(), temperature: 20 }));
    const inside = [{ time: minutesAgo(5).toISOString(), temperature: 20 }];
    const out = await answer(await post(auth, [...before, ...inside]));
    expect(out).toMatchObject({ stored: 4, outsideSpot: 3 });
    expect(out.message).toBe(
      "3 readings were stored but fall outside any placement of this sensor: assign them on the sensor page",
    );
    const fine = await answer(await post(auth, [{ time: minutesAgo(4).toISOString(), temperature: 20 }]));
    expect(fine.outsideSpot).toBe(0);
    expect(fine.message).toBeUndefined();
  });

  it("callers sharing one group commit are each told their own count", async () => {
    const placedFrom = minutesAgo(60);
    const a = await setup(placedFrom);
    const b = await setup(placedFrom);
    const w = new ReadingWriter(undefined, 50, 2000, 1); // one queue, 50 ms: the three calls share a commit
    const reading = (sensorId: number, m: number) => ({
      sensorId,
      measuredAt: minutesAgo(m),
      temperature: 20,
      humidity: null,
      lux: null,
      battery: null,
    });
    const [ra, rb, rs] = await Promise.all([
      w.write([reading(a.id, 90), reading(a.id, 89), reading(a.id, 10)]),
      w.write([reading(b.id, 10)]),
      w.store([reading(b.id, 95)]),
    ]);
    expect([ra.inserted, ra.outsideSpot]).toEqual([3, 2]);
    expect([rb.inserted, rb.outsideSpot]).toEqual([1, 0]);
    expect(rs.conflicts).toBe(0);
  });

  it("single-channel readings of one second merge into one row; only a second value for the same channel is a conflict", async () => {
    const sensor = await setup();
    const w = new ReadingWriter();
    const at = minutesAgo(15);
    const partial = (channel: "temperature" | "humidity", v: number) => ({
      sensorId: sensor.id,
      measuredAt: at,
      temperature: null,
      humidity: null,
      lux: null,
      battery: null,
      [channel]: v,
      partial: true,
    });
    expect((await w.store([partial("temperature", 20)])).conflicts).toBe(0);
    expect((await w.store([partial("humidity", 55)])).conflicts).toBe(0); // fills the row's empty column
    expect((await w.store([partial("temperature", 20)])).conflicts).toBe(0); // a resend
    expect((await w.store([partial("temperature", 23)])).conflicts).toBe(1);
    const stored = await pool().query("SELECT temperature, humidity FROM readings WHERE sensor_id = $1", [sensor.id]);
    expect(stored.rows).toEqual([{ temperature: 20, humidity: 55 }]);
  });
});
