// Malformed ids and text (issue 14): ids past PostgreSQL's int4, not numbers at all, or with a NUL,
// in paths, query strings and form fields, walked through the real loaders and actions. Each must
// get 404 (a path naming nothing) or 400 (a bad form field), never a 500; a NUL in a note is dropped
// and the note kept.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { db } from "~/.server/db";
import { notes, spots } from "~/db/schema.server";
import { loader as seriesLoader } from "~/routes/api.series";
import { action as notesAction, loader as notesLoader } from "~/routes/api.notes";
import { loader as sensorStatusLoader } from "~/routes/api.sensor-status";
import { action as membersAction } from "~/routes/members";
import { loader as plantLoader } from "~/routes/plants.$plantKey";
import { action as siteAlertsAction } from "~/routes/site.alerts";
import { loader as siteLoader } from "~/routes/site";
import { action as spotAlertsAction, loader as spotAlertsLoader } from "~/routes/spots.$spotId.alerts";
import { action as spotEditAction } from "~/routes/spots.$spotId.edit";
import { action as spotAction, loader as spotLoader } from "~/routes/spots.$spotId";
import { loader as sensorLoader } from "~/routes/sensors.$sensorId";
import { action as waterAction } from "~/routes/water";
import { action as importAction } from "~/routes/import";
import { addMember, makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

type Fn = (a: never) => unknown;
/** The status a loader or action answers with, whether it returns or throws. Anything else thrown fails the test (a 500). */
async function statusOf(fn: Fn, request: Request, params: Record<string, string>) {
  try {
    const r = await fn({ request, params, context: {} } as never);
    if (r instanceof Response) return r.status;
    const d = r as { type?: string; init?: { status?: number } | null };
    if (d && d.type === "DataWithResponseInit") return d.init?.status ?? 200;
    return 200;
  } catch (e) {
    if (e instanceof Response) return e.status;
    const x = e as { type?: string; init?: { status?: number } | null };
    if (x && x.type === "DataWithResponseInit" && x.init?.status) return x.init.status;
    throw e;
  }
}

let token: string;
let site: { id: number };
let spot: { id: number };

const req = (path: string, form?: Record<string, string>) =>
  new Request(`http://127.0.0.1${path}`, {
    method: form ? "POST" : "GET",
    headers: { Cookie: `nw_session=${token}`, ...(form ? { Origin: "http://127.0.0.1" } : {}) },
    body: form ? new URLSearchParams(form) : undefined,
  });

beforeAll(async () => {
  const owner = await makeUser();
  site = await makeSite(owner);
  spot = await makeSpot(site, { indoor: false });
  await makeSensor(site, spot);
  const mentor = await makeUser();
  await addMember(site, mentor, "mentor");
  token = generateSessionToken();
  await createSession(token, owner.id);
});

const BAD_IDS = ["99999999999", "2147483648", "abc", "1e3", "-1", "0", "1.5", "1\u0000", " "];

describe("malformed ids in paths are 404, never 500", () => {
  it("a site id", async () => {
    for (const id of BAD_IDS)
      expect(await statusOf(siteLoader as Fn, req(`/sites/${encodeURIComponent(id)}`), { siteId: id }), id).toBe(404);
  });

  it("a spot id, on the spot page, its alerts, its edit form and the series API", async () => {
    for (const id of BAD_IDS) {
      const params = { siteId: String(site.id), spotId: id };
      expect(await statusOf(spotLoader as Fn, req(`/sites/${site.id}/spots/x`), params), id).toBe(404);
      expect(await statusOf(spotAlertsLoader as Fn, req(`/sites/${site.id}/spots/x/alerts`), params), id).toBe(404);
      expect(
        await statusOf(spotEditAction as Fn, req(`/sites/${site.id}/spots/x/edit`, { name: "x" }), params),
        id,
      ).toBe(404);
      expect(await statusOf(seriesLoader as Fn, req(`/api/sites/${site.id}/spots/x/series`), params), id).toBe(404);
    }
  });

  it("a sensor id", async () => {
    for (const id of BAD_IDS) {
      const params = { siteId: String(site.id), sensorId: id };
      expect(await statusOf(sensorLoader as Fn, req(`/sites/${site.id}/sensors/x`), params), id).toBe(404);
      expect(await statusOf(sensorStatusLoader as Fn, req(`/api/sites/${site.id}/sensors/x/status`), params), id).toBe(
        404,
      );
    }
  });

  it("a plant key with a NUL", async () => {
    expect(
      await statusOf(plantLoader as Fn, req(`/sites/${site.id}/plants/x`), {
        siteId: String(site.id),
        plantKey: "phal\u0000aenopsis",
      }),
    ).toBe(404);
  });
});

describe("malformed ids in form fields and query strings are 400, never 500", () => {
  it("a watch, an alert, a note, an invitation, a member, an inventory row and a water check", async () => {
    const s = String(site.id);
    for (const id of BAD_IDS) {
      const spotParams = { siteId: s, spotId: String(spot.id) };
      expect(
        await statusOf(
          spotAlertsAction as Fn,
          req(`/sites/${s}/spots/${spot.id}/alerts`, { intent: "pause", ruleId: id }),
          spotParams,
        ),
        id,
      ).toBe(400);
      expect(
        await statusOf(
          spotAlertsAction as Fn,
          req(`/sites/${s}/spots/${spot.id}/alerts`, { intent: "update", ruleId: id, threshold: "5" }),
          spotParams,
        ),
        id,
      ).toBe(400);
      expect(
        await statusOf(siteAlertsAction as Fn, req(`/sites/${s}/alerts`, { intent: "acknowledge", eventId: id }), {
          siteId: s,
        }),
        id,
      ).toBe(400);
      expect(
        await statusOf(notesAction as Fn, req(`/api/sites/${s}/notes`, { intent: "resolve", noteId: id }), {
          siteId: s,
        }),
        id,
      ).toBe(400);
      expect(
        await statusOf(notesAction as Fn, req(`/api/sites/${s}/notes`, { intent: "add", spotId: id, body: "hello" }), {
          siteId: s,
        }),
        id,
      ).toBe(400);
      expect(
        await statusOf(notesLoader as Fn, req(`/api/sites/${s}/notes?spotId=${encodeURIComponent(id)}`), { siteId: s }),
        id,
      ).toBe(400);
      expect(
        await statusOf(membersAction as Fn, req(`/sites/${s}/members`, { intent: "revoke", invitationId: id }), {
          siteId: s,
        }),
        id,
      ).toBe(400);
      expect(
        await statusOf(membersAction as Fn, req(`/sites/${s}/members`, { intent: "role", userId: id, role: "carer" }), {
          siteId: s,
        }),
        id,
      ).toBe(400);
      expect(
        await statusOf(membersAction as Fn, req(`/sites/${s}/members`, { intent: "remove", userId: id }), {
          siteId: s,
        }),
        id,
      ).toBe(400);
      expect(
        await statusOf(
          spotAction as Fn,
          req(`/sites/${s}/spots/${spot.id}`, { intent: "plant-move", id, toSpotId: String(spot.id) }),
          spotParams,
        ),
        id,
      ).toBe(400);
      expect(
        await statusOf(
          spotAction as Fn,
          req(`/sites/${s}/spots/${spot.id}`, { intent: "plant-remove", id }),
          spotParams,
        ),
        id,
      ).toBe(400);
      expect(
        await statusOf(waterAction as Fn, req(`/sites/${s}/water`, { intent: "delete", checkId: id }), { siteId: s }),
        id,
      ).toBe(400);
    }
  });
});

describe("a NUL in free text", () => {
  it("is dropped from a note, which is kept", async () => {
    const s = String(site.id);
    const status = await statusOf(
      notesAction as Fn,
      req(`/api/sites/${s}/notes`, { intent: "add", spotId: String(spot.id), body: "Water\u0000 less in winter" }),
      { siteId: s },
    );
    expect(status).toBe(200);
    const [note] = await db().select().from(notes).where(eq(notes.spotId, spot.id));
    expect(note.body).toBe("Water less in winter");
  });

  it("is dropped from a spot's name and notes, and an invitation address with one is refused", async () => {
    const s = String(site.id);
    const params = { siteId: s, spotId: String(spot.id) };
    const form = {
      name: "Bench\u0000 by the wall",
      indoor: "outdoor",
      facing: "none",
      capacity: "3",
      notes: "Shade\u0000 after noon",
    };
    expect(await statusOf(spotEditAction as Fn, req(`/sites/${s}/spots/${spot.id}/edit`, form), params)).toBe(302);
    const [saved] = await db().select().from(spots).where(eq(spots.id, spot.id));
    expect(saved).toMatchObject({ name: "Bench by the wall", notes: "Shade after noon" });
    expect(
      await statusOf(
        membersAction as Fn,
        req(`/sites/${s}/members`, { intent: "invite", email: "a\u0000b@example.test", role: "carer" }),
        { siteId: s },
      ),
    ).toBe(400);
    expect(
      await statusOf(
        siteAlertsAction as Fn,
        req(`/sites/${s}/alerts`, { intent: "preferences", email: "on", quietFrom: "22:\u000000", quietTo: "" }),
        { siteId: s },
      ),
    ).toBe(400);
  });
});

describe("a body that is not a form", () => {
  it("gets 400, not 500: a broken multipart upload to the import and a wrong content type to a notes post", async () => {
    const s = String(site.id);
    const broken = (path: string, contentType: string) =>
      new Request(`http://127.0.0.1${path}`, {
        method: "POST",
        headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1", "Content-Type": contentType },
        body: "x".repeat(5000),
      });
    expect(
      await statusOf(importAction as Fn, broken(`/sites/${s}/import`, "multipart/form-data; boundary=x"), {
        siteId: s,
      }),
    ).toBe(400);
    expect(await statusOf(notesAction as Fn, broken(`/api/sites/${s}/notes`, "application/json"), { siteId: s })).toBe(
      400,
    );
  });
});
