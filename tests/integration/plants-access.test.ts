// The plant, compare and wishlist routes answer only with the requesting member's own site's data,
// whatever ids are put in the URL or the form (the route walk covers the status codes by role).
import { beforeAll, describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { db } from "~/.server/db";
import { customPlants, spotPlants, wishlist } from "~/db/schema.server";
import { loader as compareLoader } from "~/routes/compare";
import { loader as plantLoader, action as plantAction } from "~/routes/plants.$plantKey";
import { loader as plantsLoader } from "~/routes/plants";
import { action as spotAction, loader as spotLoader } from "~/routes/spots.$spotId";
import { action as wishlistAction, loader as wishlistLoader } from "~/routes/wishlist";
import { addMember, makeSite, makeSpot, makeUser } from "./helpers";

type Args = { request: Request; params: Record<string, string>; context: unknown };
const call = async (fn: (a: never) => unknown, a: Args) => {
  try {
    const r = await fn(a as never);
    if (r instanceof Response) return { status: r.status, body: null };
    // data() results carry an init with the status.
    const d = r as { type?: string; data?: unknown; init?: { status?: number } | null };
    if (d && d.type === "DataWithResponseInit") return { status: d.init?.status ?? 200, body: d.data };
    return { status: 200, body: r };
  } catch (e) {
    const x = e as { status?: number; init?: { status?: number } };
    if (x instanceof Response) return { status: x.status, body: null };
    if (x.init?.status || x.status) return { status: x.init?.status ?? x.status!, body: null };
    throw e;
  }
};

async function sessionFor(userId: number) {
  const token = generateSessionToken();
  await createSession(token, userId);
  return token;
}
const req = (token: string, path: string, form?: Record<string, string>) =>
  new Request(`http://127.0.0.1${path}`, {
    method: form ? "POST" : "GET",
    headers: { Cookie: `nw_session=${token}`, ...(form ? { Origin: "http://127.0.0.1" } : {}) },
    body: form ? new URLSearchParams(form) : undefined,
  });

let a: { token: string; site: { id: number }; spot: { id: number } };
let b: { token: string; site: { id: number }; spot: { id: number }; plantRow: number };
let mentorToken: string;

beforeAll(async () => {
  const ua = await makeUser();
  const ub = await makeUser();
  const mentor = await makeUser();
  const siteA = await makeSite(ua);
  const siteB = await makeSite(ub);
  await addMember(siteA, mentor, "mentor");
  const spotA = await makeSpot(siteA, { name: "A's sill" });
  const spotB = await makeSpot(siteB, { name: "B's secret shelf" });
  await db()
    .insert(customPlants)
    .values({
      siteId: siteB.id,
      key: "own-b-secret",
      basedOn: "phalaenopsis",
      profile: {
        name: "B's secret hybrid",
        group: "orchid",
        category: "warm",
        minNightC: 17,
        maxDayC: 28,
        humidityMin: 50,
        humidityMax: 80,
        light: "low",
        dliMin: 4,
        dliMax: 8,
        flowering: { note: "" },
        coldTolerance: "x",
        summary: "",
        sources: [],
      },
    });
  await db().insert(wishlist).values({ siteId: siteB.id, plantKey: "cattleya", mustHave: true, pots: 1 });
  const [row] = await db()
    .insert(spotPlants)
    .values({ spotId: spotB.id, plantKey: "phalaenopsis", nickname: "B's pet" })
    .returning();
  a = { token: await sessionFor(ua.id), site: siteA, spot: spotA };
  b = { token: await sessionFor(ub.id), site: siteB, spot: spotB, plantRow: row.id };
  mentorToken = await sessionFor(mentor.id);
});

describe("plant, compare and wishlist routes keep to the member's sites", () => {
  it("404s another site's pages for a non-member", async () => {
    const sid = String(b.site.id);
    for (const [fn, path, params] of [
      [compareLoader, `/sites/${sid}/compare`, { siteId: sid }],
      [plantsLoader, `/sites/${sid}/plants`, { siteId: sid }],
      [plantLoader, `/sites/${sid}/plants/phalaenopsis`, { siteId: sid, plantKey: "phalaenopsis" }],
      [wishlistLoader, `/sites/${sid}/wishlist`, { siteId: sid }],
    ] as const) {
      expect((await call(fn as never, { request: req(a.token, path), params, context: {} })).status, path).toBe(404);
    }
  });

  it("does not show another site's spots, own profiles or wishes through the member's own site", async () => {
    const sid = String(a.site.id);
    const cmp = await call(compareLoader as never, {
      request: req(a.token, `/sites/${sid}/compare?spots=${a.spot.id}&spots=${b.spot.id}`),
      params: { siteId: sid },
      context: {},
    });
    expect(cmp.status).toBe(200);
    expect(JSON.stringify(cmp.body)).not.toContain("B's secret shelf");
    const list = await call(plantsLoader as never, {
      request: req(a.token, `/sites/${sid}/plants`),
      params: { siteId: sid },
      context: {},
    });
    expect(JSON.stringify(list.body)).not.toContain("secret hybrid");
    const own = await call(plantLoader as never, {
      request: req(a.token, `/sites/${sid}/plants/own-b-secret`),
      params: { siteId: sid, plantKey: "own-b-secret" },
      context: {},
    });
    expect(own.status).toBe(404);
    const wishes = await call(wishlistLoader as never, {
      request: req(a.token, `/sites/${sid}/wishlist`),
      params: { siteId: sid },
      context: {},
    });
    expect((wishes.body as { rows: unknown[] }).rows).toEqual([]);
    const plant = await call(plantLoader as never, {
      request: req(a.token, `/sites/${sid}/plants/phalaenopsis`),
      params: { siteId: sid, plantKey: "phalaenopsis" },
      context: {},
    });
    expect(JSON.stringify(plant.body)).not.toContain("B's");
  });

  it("shows the owner their own profile and the fits include it", async () => {
    const sid = String(b.site.id);
    const own = await call(plantLoader as never, {
      request: req(b.token, `/sites/${sid}/plants/own-b-secret`),
      params: { siteId: sid, plantKey: "own-b-secret" },
      context: {},
    });
    expect(own.status).toBe(200);
    expect((own.body as { spots: { name: string }[] }).spots.map((s) => s.name)).toEqual(["B's secret shelf"]);
    const spot = await call(spotLoader as never, {
      request: req(b.token, `/sites/${sid}/spots/${b.spot.id}`),
      params: { siteId: sid, spotId: String(b.spot.id) },
      context: {},
    });
    expect((spot.body as { fits: { key: string }[] }).fits.map((f) => f.key)).toContain("own-b-secret");
  });

  it("refuses to move or remove another site's plant, and to move a plant into another site's spot", async () => {
    const sid = String(a.site.id);
    const params = { siteId: sid, spotId: String(a.spot.id) };
    const remove = await call(spotAction as never, {
      request: req(a.token, `/sites/${sid}/spots/${a.spot.id}`, { intent: "plant-remove", id: String(b.plantRow) }),
      params,
      context: {},
    });
    expect(remove.status).toBe(404);
    await call(spotAction as never, {
      request: req(a.token, `/sites/${sid}/spots/${a.spot.id}`, { intent: "plant-add", plantKey: "hoya", pots: "1" }),
      params,
      context: {},
    });
    const mine = (await db().select().from(spotPlants)).find((r) => r.spotId === a.spot.id)!;
    const move = await call(spotAction as never, {
      request: req(a.token, `/sites/${sid}/spots/${a.spot.id}`, {
        intent: "plant-move",
        id: String(mine.id),
        toSpotId: String(b.spot.id),
      }),
      params,
      context: {},
    });
    expect(move.status).toBe(400);
    const bRows = (await db().select().from(spotPlants)).filter((r) => r.spotId === b.spot.id);
    expect(bRows.map((r) => r.nickname)).toEqual(["B's pet"]);
  });

  it("lets a mentor read the wishlist but not change it", async () => {
    const sid = String(a.site.id);
    expect(
      (
        await call(wishlistLoader as never, {
          request: req(mentorToken, `/sites/${sid}/wishlist`),
          params: { siteId: sid },
          context: {},
        })
      ).status,
    ).toBe(200);
    const post = await call(wishlistAction as never, {
      request: req(mentorToken, `/sites/${sid}/wishlist`, { intent: "save", plantKey: "hoya", pots: "1" }),
      params: { siteId: sid },
      context: {},
    });
    expect(post.status).toBe(403);
    const wish = await call(plantAction as never, {
      request: req(mentorToken, `/sites/${sid}/plants/hoya`, { intent: "wish", pots: "1" }),
      params: { siteId: sid, plantKey: "hoya" },
      context: {},
    });
    expect(wish.status).toBe(403);
  });
});
