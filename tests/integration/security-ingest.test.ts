// Revocation, through the real actions: deleting a sensor or rotating its secret closes its open
// MQTT connections and refuses the old secret (MQTT 3.1.1 §3.2.2.3: CONNACK return code 4, bad
// user name or password); changing a password signs out the user's other sessions (OWASP Session
// Management Cheat Sheet, "Renew the Session ID After Any Privilege Level Change" and password change).
import { createHash } from "node:crypto";
import { connectAsync, type MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createSession, generateSessionToken, hashPassword, validateSessionToken } from "~/.server/auth";
import { pool } from "~/.server/db";
import { startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { invalidateSensorCache } from "~/.server/ingest/sensor-cache";
import { hashSensorSecret } from "~/.server/secrets";
import { ReadingWriter } from "~/.server/ingest/writer";
import { action as sensorAction } from "~/routes/sensors.$sensorId";
import { action as settingsAction } from "~/routes/settings";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

let broker: RunningBroker;
const clients: MqttClient[] = [];

beforeAll(async () => {
  broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer: new ReadingWriter(), log: () => {} });
});
afterAll(async () => {
  await Promise.all(clients.map((c) => c.endAsync(true).catch(() => {})));
  await broker?.close();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function signedIn(userId: number) {
  const token = generateSessionToken();
  await createSession(token, userId);
  return token;
}

const formPost = (path: string, token: string, fields: Record<string, string>) =>
  new Request(`http://127.0.0.1${path}`, {
    method: "POST",
    headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1" },
    body: new URLSearchParams(fields),
  });

async function mqtt(sensorId: number, secret: string) {
  const c = await connectAsync(`mqtt://127.0.0.1:${broker.port}`, {
    protocolVersion: 4,
    username: String(sensorId),
    password: secret,
    clientId: `sec-${sensorId}-${Math.random().toString(36).slice(2)}`,
    reconnectPeriod: 0,
    connectTimeout: 5000,
  });
  clients.push(c);
  return c;
}

/** The CONNACK return code of a refused connection (0 if it was accepted). */
async function connectCode(sensorId: number, secret: string) {
  try {
    const c = await mqtt(sensorId, secret);
    await c.endAsync(true);
    return 0;
  } catch (e) {
    return (e as { code?: number }).code;
  }
}

const closed = (c: MqttClient) =>
  new Promise<void>((resolve) => (c.disconnected || !c.connected ? resolve() : c.once("close", () => resolve())));

async function setup() {
  const owner = await makeUser();
  const site = await makeSite(owner);
  const spot = await makeSpot(site);
  const sensor = await makeSensor(site, spot);
  return { owner, site, spot, sensor, token: await signedIn(owner.id) };
}

describe("revoking a sensor", () => {
  it("deleting a sensor closes its open MQTT connection and refuses it from then on", async () => {
    const { site, sensor, token } = await setup();
    const c = await mqtt(sensor.id, sensor.secret);
    const at = new Date(Math.floor((Date.now() - 60_000) / 1000) * 1000).toISOString();
    await c.publishAsync(`nichewise/sensors/${sensor.id}/reading`, JSON.stringify({ time: at, temperature: 19 }), {
      qos: 1,
    });
    const gone = closed(c);
    const res = await sensorAction({
      request: formPost(`/sites/${site.id}/sensors/${sensor.id}`, token, { intent: "delete", confirm: sensor.name }),
      params: { siteId: String(site.id), sensorId: String(sensor.id) },
    } as never).catch((r: unknown) => r);
    expect((res as Response).status).toBe(302);
    await Promise.race([
      gone,
      sleep(3000).then(() => Promise.reject(new Error("the deleted sensor's connection stayed open"))),
    ]);
    expect(broker.connectedSensors()).toBe(0);
    expect(await connectCode(sensor.id, sensor.secret)).toBe(4);
    const rows = await pool().query("SELECT 1 FROM readings WHERE sensor_id = $1", [sensor.id]);
    expect(rows.rowCount).toBe(0);
  });

  it("rotating the secret closes the connection, refuses the old secret and accepts the new one", async () => {
    const { site, sensor, token } = await setup();
    const c = await mqtt(sensor.id, sensor.secret);
    const gone = closed(c);
    const res = await sensorAction({
      request: formPost(`/sites/${site.id}/sensors/${sensor.id}`, token, { intent: "rotate" }),
      params: { siteId: String(site.id), sensorId: String(sensor.id) },
    } as never).catch((r: unknown) => r);
    const location = (res as Response).headers.get("Location") ?? "";
    const fresh = /#secret=([A-Za-z0-9]+)$/.exec(location)?.[1];
    expect(fresh, location).toBeTruthy();
    await Promise.race([gone, sleep(3000).then(() => Promise.reject(new Error("the old connection stayed open")))]);
    // Refused although the old secret was verified (and remembered) moments ago.
    expect(await connectCode(sensor.id, sensor.secret)).toBe(4);
    expect(await connectCode(sensor.id, fresh!)).toBe(0);
  });
});

describe("sensor secrets", () => {
  it("stores only the secret's SHA-256, refuses a wrong or near-miss secret, and accepts the right one", async () => {
    const { sensor } = await setup();
    const { rows } = await pool().query<{ secret_hash: string }>("SELECT secret_hash FROM sensors WHERE id = $1", [
      sensor.id,
    ]);
    // FIPS 180-4 SHA-256 (checked against node:crypto, an independent implementation).
    expect(rows[0].secret_hash).toBe(`sha256:${createHash("sha256").update(sensor.secret).digest("hex")}`);
    expect(await connectCode(sensor.id, `${sensor.secret}x`)).toBe(4);
    expect(await connectCode(sensor.id, sensor.secret.slice(0, -1))).toBe(4);
    expect(await connectCode(sensor.id, "")).toBe(4);
    expect(await connectCode(sensor.id, sensor.secret)).toBe(0);
  });

  it("accepts a sensor made before the change (argon2id hash) and stores the new form after its first connect", async () => {
    const { sensor } = await setup();
    await pool().query("UPDATE sensors SET secret_hash = $1 WHERE id = $2", [
      await hashPassword(sensor.secret),
      sensor.id,
    ]);
    invalidateSensorCache(sensor.id);
    expect(await connectCode(sensor.id, "wrong")).toBe(4);
    const before = await pool().query<{ secret_hash: string }>("SELECT secret_hash FROM sensors WHERE id = $1", [
      sensor.id,
    ]);
    expect(before.rows[0].secret_hash).toMatch(/^\$argon2id\$/);
    expect(await connectCode(sensor.id, sensor.secret)).toBe(0);
    const after = await pool().query<{ secret_hash: string }>("SELECT secret_hash FROM sensors WHERE id = $1", [
      sensor.id,
    ]);
    expect(after.rows[0].secret_hash).toBe(hashSensorSecret(sensor.secret));
    expect(await connectCode(sensor.id, sensor.secret)).toBe(0);
    expect(await connectCode(sensor.id, "wrong")).toBe(4);
  });
});

describe("password change", () => {
  it("signs out every other session of the user and keeps the one that changed it", async () => {
    const user = await makeUser({ password: "the old password 1" });
    const here = await signedIn(user.id);
    const elsewhere = await signedIn(user.id);
    const other = await makeUser();
    const othersSession = await signedIn(other.id);

    const wrong = await settingsAction({
      request: formPost("/settings", here, { intent: "password", current: "not it", next: "a new password 2" }),
    } as never);
    expect((wrong as { init?: { status?: number } }).init?.status).toBe(400);
    expect(await validateSessionToken(elsewhere)).not.toBeNull(); // a refused change revokes nothing

    const ok = await settingsAction({
      request: formPost("/settings", here, {
        intent: "password",
        current: "the old password 1",
        next: "a new password 2",
      }),
    } as never);
    expect(ok).toEqual({ saved: "password" });
    expect(await validateSessionToken(elsewhere)).toBeNull();
    expect(await validateSessionToken(here)).not.toBeNull();
    expect(await validateSessionToken(othersSession)).not.toBeNull();
  });
});
