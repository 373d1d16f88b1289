// Watches (issue 14): pausing and every edit are audited, pausing a cold or silent watch e-mails the
// owners (through the real SMTP sink), the default cold watch comes with a tender plant in an
// outdoor spot and never on an empty one, mentors hear of cold snaps only when they opt in, and a
// spot change is one transaction with its audit row and the sensor cache's invalidation.
import { and, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { siteRecipients } from "~/.server/alerts/recipients";
import { db } from "~/.server/db";
import { invalidateSensorCache, sensorInfo } from "~/.server/ingest/sensor-cache";
import { sunkMail } from "~/.server/mail";
import { seedAlerts } from "~/.server/seed-alerts";
import { deleteSpot, updateSpot } from "~/.server/spots";
import { alertEvents, watches, auditLog, spotPlants, users } from "~/db/schema.server";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { action as siteAlertsAction } from "~/routes/site.alerts";
import { action as spotAlertsAction, loader as spotAlertsLoader } from "~/routes/spots.$spotId.alerts";
import { action as spotAction } from "~/routes/spots.$spotId";
import { addMember, makeSensor, makeSite, makeSpot, makeUser, useMailSink } from "./helpers";

useMailSink();

type Fn = (a: never) => unknown;
async function call(fn: Fn, request: Request, params: Record<string, string>) {
  try {
    const r = await fn({ request, params, context: {} } as never);
    if (r instanceof Response) return { status: r.status, body: null as unknown };
    const d = r as { type?: string; data?: unknown; init?: { status?: number } | null };
    if (d && d.type === "DataWithResponseInit") return { status: d.init?.status ?? 200, body: d.data };
    return { status: 200, body: r as unknown };
  } catch (e) {
    if (e instanceof Response) return { status: e.status, body: null };
    const x = e as { type?: string; init?: { status?: number } | null };
    if (x?.type === "DataWithResponseInit") return { status: x.init?.status ?? 500, body: null };
    throw e;
  }
}
const post = (token: string, path: string, form: Record<string, string | string[]>) => {
  const body = new URLSearchParams();
  for (const [k, v] of Object.entries(form)) for (const x of [v].flat()) body.append(k, x);
  return new Request(`http://127.0.0.1${path}`, {
    method: "POST",
    headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1" },
    body,
  });
};
const get = (token: string, path: string) =>
  new Request(`http://127.0.0.1${path}`, { headers: { Cookie: `nw_session=${token}` } });

async function person(name: string) {
  const u = await makeUser();
  await db().update(users).set({ name }).where(eq(users.id, u.id));
  const token = generateSessionToken();
  await createSession(token, u.id);
  return { ...u, name, token };
}

async function household() {
  const owner = await person("Hettie Owner");
  const coOwner = await person("Rowan Co-owner");
  const carer = await person("Jory Carer");
  const mentor = await person("Morwenna Mentor");
  const site = await makeSite(owner);
  await addMember(site, coOwner, "owner");
  await addMember(site, carer, "carer");
  await addMember(site, mentor, "mentor");
  const spot = await makeSpot(site, { indoor: false, name: `Bench ${Math.random().toString(36).slice(2, 8)}` });
  return { owner, coOwner, carer, mentor, site, spot };
}

const placePlant = (
  h: { site: { id: number }; spot: { id: number } },
  token: string,
  plantKey: string,
  spotId = h.spot.id,
) =>
  call(
    spotAction as Fn,
    post(token, `/sites/${h.site.id}/spots/${spotId}`, { intent: "plant-add", plantKey, nickname: "", pots: "1" }),
    { siteId: String(h.site.id), spotId: String(spotId) },
  );
const rulesOf = (spotId: number) => db().select().from(watches).where(eq(watches.spotId, spotId)).orderBy(watches.kind);
const auditOf = async (siteId: number, prefix: string) =>
  (await db().select().from(auditLog).where(eq(auditLog.siteId, siteId)).orderBy(auditLog.id)).filter((a) =>
    a.action.startsWith(prefix),
  );

const PHAL = PLANT_LIBRARY.find((p) => p.key === "phalaenopsis")!;
const CYMB = PLANT_LIBRARY.find((p) => p.key === "cymbidium")!;

describe("the default cold watch comes with the plants", () => {
  it(
    "an empty outdoor spot gets no watch, from the demo seed " +
      "either; a tender plant placed there adds one from its lowest " +
      "safe night + 2 °C, with the reason",
    async () => {
      const h = await household();
      await seedAlerts(h.site.id, () => {});
      expect(await rulesOf(h.spot.id)).toHaveLength(0);
      const page = await call(spotAlertsLoader as Fn, get(h.owner.token, "/"), {
        siteId: String(h.site.id),
        spotId: String(h.spot.id),
      });
      expect((page.body as { suggestion: unknown }).suggestion).toBeNull();

      // A carer places a cymbidium: the spot gets its cold watch (and a silent-sensor watch).
      expect((await placePlant(h, h.carer.token, "cymbidium")).status).toBe(200);
      let rules = await rulesOf(h.spot.id);
      expect(rules.map((r) => r.kind)).toEqual(["cold", "silent"]);
      const cold = rules.find((r) => r.kind === "cold")!;
      // Common practice (and this product's rule): act 2 °C above the plant's lowest safe night.
      expect(cold.threshold).toBe(CYMB.minNightC + 2);
      expect(cold.reason).toContain(`${CYMB.minNightC} °C`);
      expect((await auditOf(h.site.id, "watch.")).map((a) => a.action)).toEqual(["watch.add", "watch.add"]);

      // A more tender plant raises the untouched default watch; an owner-set line is left alone.
      await placePlant(h, h.carer.token, "phalaenopsis");
      rules = await rulesOf(h.spot.id);
      expect(rules.find((r) => r.kind === "cold")!.threshold).toBe(PHAL.minNightC + 2);
      expect(rules).toHaveLength(2);
    },
  );

  it("an indoor spot gets none; turning it outdoor with a plant in it adds one in the same change", async () => {
    const h = await household();
    const sill = await makeSpot(h.site, { indoor: true });
    await placePlant(h, h.owner.token, "hoya", sill.id);
    expect(await rulesOf(sill.id)).toHaveLength(0);
    await updateSpot({
      siteId: h.site.id,
      actorId: h.owner.id,
      spot: sill,
      values: { name: sill.name, indoor: false, facing: "none", capacity: 0, notes: "" },
    });
    expect((await rulesOf(sill.id)).map((r) => r.kind)).toEqual(["cold", "silent"]);
  });

  it("moving a plant out to an empty outdoor spot gives that spot its cold watch", async () => {
    const h = await household();
    const shelf = await makeSpot(h.site, { indoor: true });
    await placePlant(h, h.owner.token, "hoya", shelf.id);
    const [row] = await db().select().from(spotPlants).where(eq(spotPlants.spotId, shelf.id));
    const moved = await call(
      spotAction as Fn,
      post(h.carer.token, "/", { intent: "plant-move", id: String(row.id), toSpotId: String(h.spot.id) }),
      { siteId: String(h.site.id), spotId: String(shelf.id) },
    );
    expect(moved.status).toBe(200);
    const cold = (await rulesOf(h.spot.id)).find((r) => r.kind === "cold")!;
    expect(cold.threshold).toBe(PLANT_LIBRARY.find((p) => p.key === "hoya")!.minNightC + 2);
  });
});

describe("pausing and editing a watch", () => {
  it("a carer pausing the cold watch closes the open event, is audited, and e-mails both owners who paused which watch", async () => {
    const h = await household();
    await placePlant(h, h.owner.token, "cymbidium");
    const cold = (await rulesOf(h.spot.id)).find((r) => r.kind === "cold")!;
    const [ev] = await db()
      .insert(alertEvents)
      .values({
        ruleId: cold.id,
        spotId: h.spot.id,
        kind: "cold",
        startedAt: new Date(Date.now() - 20 * 60_000),
        peak: 3,
      })
      .returning();
    const before = sunkMail().length;

    const res = await call(
      spotAlertsAction as Fn,
      post(h.carer.token, "/", { intent: "pause", ruleId: String(cold.id) }),
      { siteId: String(h.site.id), spotId: String(h.spot.id) },
    );
    expect(res.status).toBe(200);
    expect((await rulesOf(h.spot.id)).find((r) => r.kind === "cold")!.paused).toBe(true);
    const [closed] = await db().select().from(alertEvents).where(eq(alertEvents.id, ev.id));
    expect(closed.endedAt).not.toBeNull();

    const [audit] = await auditOf(h.site.id, "watch.pause");
    expect(audit).toMatchObject({
      actorId: h.carer.id,
      detail: { ruleId: cold.id, kind: "cold", closedEvents: [ev.id] },
    });

    const mails = sunkMail().slice(before);
    expect(mails.flatMap((m) => m.to).sort()).toEqual([h.owner.email, h.coOwner.email].sort());
    expect(mails[0].subject).toContain("Cold snap watch paused");
    expect(mails[0].subject).toContain(`"Jory Carer"`);
    const body = mails[0].raw.replace(/=\r?\n/g, "");
    expect(body).toContain(h.spot.name);
    expect(body).toMatch(/Cold-snap alerts for this spot are off until someone resumes/);

    // Pausing again changes nothing and tells nobody; resuming is audited too.
    await call(spotAlertsAction as Fn, post(h.carer.token, "/", { intent: "pause", ruleId: String(cold.id) }), {
      siteId: String(h.site.id),
      spotId: String(h.spot.id),
    });
    expect(sunkMail().length).toBe(before + 2);
    await call(spotAlertsAction as Fn, post(h.carer.token, "/", { intent: "resume", ruleId: String(cold.id) }), {
      siteId: String(h.site.id),
      spotId: String(h.spot.id),
    });
    expect((await auditOf(h.site.id, "watch.")).map((a) => a.action).slice(-2)).toEqual([
      "watch.pause",
      "watch.resume",
    ]);
  });

  it("an owner pausing the silent-sensor watch e-mails the other owner, not themself", async () => {
    const h = await household();
    await placePlant(h, h.owner.token, "cymbidium");
    const silent = (await rulesOf(h.spot.id)).find((r) => r.kind === "silent")!;
    const before = sunkMail().length;
    await call(spotAlertsAction as Fn, post(h.owner.token, "/", { intent: "pause", ruleId: String(silent.id) }), {
      siteId: String(h.site.id),
      spotId: String(h.spot.id),
    });
    const mails = sunkMail().slice(before);
    expect(mails.flatMap((m) => m.to)).toEqual([h.coOwner.email]);
    expect(mails[0].raw.replace(/=\r?\n/g, "")).toMatch(/Silent-sensor alerts for this spot are off/);
  });

  it("every edit of a watch is audited with what changed; adding and removing too", async () => {
    const h = await household();
    const params = { siteId: String(h.site.id), spotId: String(h.spot.id) };
    const added = await call(
      spotAlertsAction as Fn,
      post(h.owner.token, "/", {
        intent: "add",
        kind: "heat",
        threshold: "30",
        durationMinutes: "20",
        hysteresis: "1",
        clearMinutes: "30",
      }),
      params,
    );
    const ruleId = String((added.body as { saved: number }).saved);
    await call(
      spotAlertsAction as Fn,
      post(h.owner.token, "/", {
        intent: "update",
        ruleId,
        threshold: "33",
        durationMinutes: "20",
        hysteresis: "1",
        clearMinutes: "30",
      }),
      params,
    );
    await call(spotAlertsAction as Fn, post(h.owner.token, "/", { intent: "delete", ruleId }), params);
    const log = await auditOf(h.site.id, "watch.");
    expect(log.map((a) => a.action)).toEqual(["watch.add", "watch.update", "watch.delete"]);
    expect(log[1].detail).toMatchObject({ kind: "heat", changes: { threshold: [30, 33] } });
    expect(log.every((a) => a.actorId === h.owner.id)).toBe(true);
  });
});

describe("mentors and cold-snap e-mail", () => {
  it("a mentor gets no cold-snap or silent-sensor e-mail until they tick it; owners and carers do by default", async () => {
    const h = await household();
    const byUser = async () => new Map((await siteRecipients(h.site.id)).map((r) => [r.userId, r.kinds]));
    let kinds = await byUser();
    expect(kinds.get(h.mentor.id)).not.toContain("cold");
    expect(kinds.get(h.mentor.id)).not.toContain("silent");
    expect(kinds.get(h.carer.id)).toContain("cold");
    expect(kinds.get(h.owner.id)).toContain("cold");
    const res = await call(
      siteAlertsAction as Fn,
      post(h.mentor.token, "/", {
        intent: "preferences",
        email: "on",
        kinds: ["cold", "heat"],
        quietFrom: "",
        quietTo: "",
      }),
      { siteId: String(h.site.id) },
    );
    expect(res.status).toBe(200);
    kinds = await byUser();
    expect(kinds.get(h.mentor.id)).toEqual(["cold", "heat"]);
  });
});

describe("spot changes in one place", () => {
  it(
    "editing a spot indoor → outdoor is audited with what changed " +
      "and its sensors' cached kind is forgotten; deleting one audits " +
      "and forgets too",
    async () => {
      const h = await household();
      const spot = await makeSpot(h.site, { indoor: true, name: "Sill" });
      const sensor = await makeSensor(h.site, spot);
      invalidateSensorCache(sensor.id);
      expect((await sensorInfo(sensor.id))!.kind).toBe("indoor");
      await updateSpot({
        siteId: h.site.id,
        actorId: h.owner.id,
        spot,
        values: { name: "Sill", indoor: false, facing: "S", capacity: 4, notes: "" },
      });
      expect((await sensorInfo(sensor.id))!.kind).toBe("outdoor"); // read again at once, not after the cache's 10 s
      const [upd] = await auditOf(h.site.id, "spot.update");
      expect(upd.detail).toMatchObject({
        spotId: spot.id,
        changes: { indoor: [true, false], facing: ["none", "S"], capacity: [0, 4] },
      });

      expect(await deleteSpot({ siteId: h.site.id, actorId: h.owner.id, spot })).toBe(true);
      expect((await sensorInfo(sensor.id))!.kind).toBe("unplaced");
      expect((await auditOf(h.site.id, "spot.delete"))[0].detail).toMatchObject({ spotId: spot.id, name: "Sill" });
      // A spot of another site is neither changed nor deleted through this one.
      const other = await makeSpot(await makeSite(h.owner));
      expect(await deleteSpot({ siteId: h.site.id, actorId: h.owner.id, spot: other })).toBe(false);
      expect(
        await db()
          .select()
          .from(auditLog)
          .where(and(eq(auditLog.siteId, h.site.id), eq(auditLog.action, "spot.delete"))),
      ).toHaveLength(1);
    },
  );
});
