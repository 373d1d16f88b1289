// The home-broker page's loader and action with real sessions: only the owner configures (roles on
// the server, OWASP ASVS V4 access control), the password never goes back to a page, and bad input
// gets a clear error and changes nothing.
import { randomBytes } from "node:crypto";
import { statSync } from "node:fs";
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken, SESSION_COOKIE } from "~/.server/auth";
import { db } from "~/.server/db";
import { env } from "~/.server/env";
import { SiteBridge } from "~/.server/bridge/runtime";
import { keyFilePath, sealWith } from "~/.server/bridge/secret";
import { getBridge, listLinks, sealPlainPasswords } from "~/.server/bridge/store";
import { bridges } from "~/db/schema.server";
import { action, loader } from "~/routes/site.broker";
import { addMember, makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

async function sessionOf(user: { id: number }) {
  const token = generateSessionToken();
  await createSession(token, user.id);
  return token;
}

const request = (siteId: number, token: string, fields?: Record<string, string>) => {
  const init: RequestInit = { headers: { Cookie: `${SESSION_COOKIE}=${token}` } };
  if (fields) {
    const form = new FormData();
    for (const [k, v] of Object.entries(fields)) form.set(k, v);
    Object.assign(init, { method: "POST", body: form });
  }
  return new Request(`http://127.0.0.1/sites/${siteId}/broker`, init);
};

/** The answer as { status, body }, whether returned (data() or plain) or thrown (data()). */
async function answer(p: Promise<unknown>): Promise<{ status: number; body: unknown }> {
  let res: unknown;
  try {
    res = await p;
  } catch (thrown) {
    res = thrown;
  }
  const r = res as { type?: string; data?: unknown; init?: { status?: number } };
  if (r && r.type === "DataWithResponseInit") return { status: r.init?.status ?? 200, body: r.data };
  if (res instanceof Response) return { status: res.status, body: await res.text() };
  return { status: 200, body: res };
}

const post = (siteId: number, token: string, fields: Record<string, string>) =>
  answer(
    action({
      request: request(siteId, token, fields),
      params: { siteId: String(siteId) },
    } as never) as Promise<unknown>,
  );
const load = (siteId: number, token: string) =>
  answer(loader({ request: request(siteId, token), params: { siteId: String(siteId) } } as never) as Promise<unknown>);

const SETTINGS = {
  intent: "save",
  url: "mqtt://127.0.0.1:1",
  username: "nichewise",
  password: "s3cret-home-pass",
  protocolVersion: "4",
  enabled: "on",
};

describe("the home-broker page", () => {
  it("lets only the owner configure it, and never sends the password back", async () => {
    const owner = await makeUser();
    const carer = await makeUser();
    const site = await makeSite(owner);
    await addMember(site, carer, "carer");
    const [ownerToken, carerToken] = [await sessionOf(owner), await sessionOf(carer)];

    expect((await post(site.id, carerToken, SETTINGS)).status).toBe(403);
    expect(await getBridge(site.id)).toBeNull();

    expect(await post(site.id, ownerToken, SETTINGS)).toMatchObject({ status: 200, body: { saved: true } });
    expect((await getBridge(site.id))?.password).toBe("s3cret-home-pass");
    // Saving again without a password keeps the stored one.
    await post(site.id, ownerToken, { ...SETTINGS, password: "" });
    expect((await getBridge(site.id))?.password).toBe("s3cret-home-pass");

    const asOwner = await load(site.id, ownerToken);
    expect(JSON.stringify(asOwner.body)).not.toContain("s3cret-home-pass");
    expect(asOwner.body).toMatchObject({
      bridge: { url: "mqtt://127.0.0.1:1", username: "nichewise", hasPassword: true },
    });
    // Other members see whether it is on, not where the broker is or as whom Nichewise signs in.
    const asCarer = await load(site.id, carerToken);
    expect(asCarer.body).toMatchObject({ bridge: { enabled: true } });
    expect(JSON.stringify(asCarer.body)).not.toContain("127.0.0.1:1");
    expect(JSON.stringify(asCarer.body)).not.toContain('nichewise"');
  });

  it("refuses a wrong address, another site's sensor and an incomplete mapping with a clear reason", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const other = await makeSite(owner);
    const token = await sessionOf(owner);
    const bad = await post(site.id, token, { ...SETTINGS, url: "http://192.168.1.20" });
    expect(bad).toMatchObject({ status: 400, body: { errors: { url: "Use mqtt:// (plain) or mqtts:// (TLS)" } } });
    await post(site.id, token, SETTINGS);

    const theirs = await makeSensor(other, await makeSpot(other));
    const mine = await makeSensor(site, await makeSpot(site));
    const wrongSite = await post(site.id, token, {
      intent: "attach",
      topic: "zigbee2mqtt/bench",
      sensorId: String(theirs.id),
      mapping: JSON.stringify({ preset: "zigbee2mqtt" }),
    });
    expect(wrongSite).toMatchObject({ status: 400, body: { errors: { form: "That sensor is not in this site." } } });
    const noChannel = await post(site.id, token, {
      intent: "attach",
      topic: "node/sensor/t/state",
      sensorId: String(mine.id),
      preset: "esphome",
    });
    expect(noChannel).toMatchObject({ status: 400, body: { errors: { channel: "Choose what the number measures" } } });
    const wildcard = await post(site.id, token, {
      intent: "attach",
      topic: "zigbee2mqtt/#",
      sensorId: String(mine.id),
      mapping: JSON.stringify({ preset: "zigbee2mqtt" }),
    });
    expect(wildcard).toMatchObject({
      status: 400,
      body: { errors: { topic: expect.stringContaining("no wildcards") } },
    });
    const config = (await getBridge(site.id))!;
    expect(await listLinks(config.id)).toEqual([]);

    // A hand-made mapping that is complete is attached.
    const ok = await post(site.id, token, {
      intent: "attach",
      topic: "lab/env",
      sensorId: String(mine.id),
      preset: "custom",
      unitOfTemperature: "F",
      path_temperature: "env.t",
      path_time: "ts",
    });
    expect(ok).toMatchObject({ status: 200, body: { attached: "lab/env" } });
    expect(await listLinks(config.id)).toMatchObject([
      {
        topic: "lab/env",
        sensorId: mine.id,
        mapping: { preset: "custom", unit: "F", paths: { temperature: "env.t", time: "ts" } },
      },
    ]);
  });

  // Encryption at rest: AES-256-GCM (NIST SP 800-38D) under a key kept outside the database.
  const stored = async (siteId: number) =>
    (await db().select({ password: bridges.password }).from(bridges).where(eq(bridges.siteId, siteId)))[0]?.password;

  it("never stores the password in the column, and seals plain ones from before at start or on save", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const token = await sessionOf(owner);
    await post(site.id, token, SETTINGS);
    const column = await stored(site.id);
    expect(column).toMatch(/^v1:/);
    expect(column).not.toContain("s3cret-home-pass");
    expect(Buffer.from(column!.slice(3), "base64").toString("latin1")).not.toContain("s3cret-home-pass");
    expect((await getBridge(site.id))?.password).toBe("s3cret-home-pass");
    if (!env().NW_SECRET_KEY) expect(statSync(keyFilePath()).mode & 0o777).toBe(0o600);

    // A row saved before encryption, in plain text: still read, then sealed at start.
    await db().update(bridges).set({ password: "old-plain-pass" }).where(eq(bridges.siteId, site.id));
    expect((await getBridge(site.id))?.password).toBe("old-plain-pass");
    expect(await sealPlainPasswords()).toBeGreaterThanOrEqual(1);
    expect(await stored(site.id)).toMatch(/^v1:/);
    expect((await getBridge(site.id))?.password).toBe("old-plain-pass");
    // …or on the next save that keeps it.
    await db().update(bridges).set({ password: "old-plain-pass" }).where(eq(bridges.siteId, site.id));
    await post(site.id, token, { ...SETTINGS, password: "" });
    expect(await stored(site.id)).toMatch(/^v1:/);
    expect((await getBridge(site.id))?.password).toBe("old-plain-pass");

    // A sealed value copied into another site's row does not open there.
    const other = await makeSite(owner);
    await post(other.id, token, { ...SETTINGS, password: "another" });
    await db().update(bridges).set({ password: column }).where(eq(bridges.siteId, other.id));
    expect((await getBridge(other.id))?.passwordError).toMatch(/cannot be read/);
  });

  it("says clearly on the page when the stored password was sealed under another key, and starts no connection", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const token = await sessionOf(owner);
    await post(site.id, token, SETTINGS);
    await db()
      .update(bridges)
      .set({ password: sealWith(randomBytes(32), "s3cret-home-pass", `bridge:${site.id}`) })
      .where(eq(bridges.siteId, site.id));

    const page = await load(site.id, token);
    expect(page.status).toBe(200);
    expect(page.body).toMatchObject({
      bridge: { hasPassword: true, passwordError: expect.stringContaining("Type the password again and save") },
    });
    const listen = await post(site.id, token, { intent: "listen", prefix: "zigbee2mqtt" });
    expect(listen).toMatchObject({
      status: 400,
      body: { errors: { prefix: expect.stringContaining("cannot be read") } },
    });

    const config = (await getBridge(site.id))!;
    const bridge = new SiteBridge(config, [], { writer: null as never });
    bridge.start();
    expect(bridge.state).toMatchObject({
      status: "stopped",
      lastError: { message: expect.stringContaining("cannot be read") },
    });
    await bridge.stop();

    // Typing the password again mends it.
    await post(site.id, token, { ...SETTINGS, password: "typed-again" });
    expect(await getBridge(site.id)).toMatchObject({ password: "typed-again", passwordError: null });
  });

  it("attaches a heard topic to a new sensor made in the same step, named after the device and placed in the chosen spot", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const spot = await makeSpot(site);
    const token = await sessionOf(owner);
    const attach = (sensorId: string, topic: string) =>
      post(site.id, token, { intent: "attach", topic, sensorId, mapping: JSON.stringify({ preset: "zigbee2mqtt" }) });
    // Not before a broker is connected: no sensor is made for nothing.
    expect(await attach(`new:${spot.id}`, "zigbee2mqtt/orchid_shelf")).toMatchObject({
      status: 400,
      body: { errors: { form: "Connect the home broker first." } },
    });
    expect((await load(site.id, token)).body).toMatchObject({ sensors: [] });
    await post(site.id, token, SETTINGS);

    const ok = await attach(`new:${spot.id}`, "zigbee2mqtt/orchid_shelf");
    expect(ok).toMatchObject({
      status: 200,
      body: { attached: "zigbee2mqtt/orchid_shelf", created: "orchid shelf", placedIn: spot.name },
    });
    const page = await load(site.id, token);
    expect(page.body).toMatchObject({
      sensors: [{ name: "orchid shelf", spotName: spot.name }],
      links: [{ topic: "zigbee2mqtt/orchid_shelf", sensorName: "orchid shelf" }],
    });
    // Not placed, and another site's spot refused with its reason.
    const other = await makeSite(owner);
    const theirs = await makeSpot(other);
    expect(await attach("new:", "zigbee2mqtt/window_sill")).toMatchObject({
      status: 200,
      body: { created: "window sill" },
    });
    expect(await attach(`new:${theirs.id}`, "zigbee2mqtt/porch")).toMatchObject({
      status: 400,
      body: { errors: { form: "That spot is not in this site." } },
    });
    expect(await attach("new:abc", "zigbee2mqtt/porch")).toMatchObject({
      status: 400,
      body: { errors: { sensorId: expect.any(String) } },
    });
    expect(((await load(site.id, token)).body as { sensors: unknown[] }).sensors).toHaveLength(2);
  });
});
