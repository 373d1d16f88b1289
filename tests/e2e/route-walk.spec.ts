// Walks the whole route table as a signed-out visitor, a stranger (member of another site) and each
// role, and checks each gets exactly what the brief allows. A route added to app/routes.ts without
// an entry here fails the first test, so no route ships unchecked.
import { request as playwrightRequest, type APIRequestContext } from "@playwright/test";
import type { RouteConfigEntry } from "@react-router/dev/routes";
import routes from "../../app/routes";
import { test, expect, DEMO } from "./fixtures";

type Who = "anon" | "stranger" | "mentor" | "carer" | "owner";
type Expect = { get: Partial<Record<Who, number>>; post?: Partial<Record<Who, number>> };

const all = (n: number): Partial<Record<Who, number>> => ({ anon: n, stranger: n, mentor: n, carer: n, owner: n });
const member = { anon: 302, stranger: 404, mentor: 200, carer: 200, owner: 200 };
const ownerOnly = { anon: 302, stranger: 404, mentor: 403, carer: 403, owner: 200 };
const writers = { anon: 302, stranger: 404, mentor: 403, carer: 200, owner: 200 };
const signedIn = { anon: 302, stranger: 200, mentor: 200, carer: 200, owner: 200 };
// Posts are checked only for who must be refused; the body is empty so nothing is changed.
const refuse = (ok: Who[]) => {
  const base: Partial<Record<Who, number>> = { anon: 302, stranger: 404, mentor: 403, carer: 403, owner: 403 };
  for (const w of ok) delete base[w];
  return base;
};

const EXPECT: Record<string, Expect> = {
  "/sign-in": { get: { anon: 200, owner: 302 } },
  "/sign-up": { get: { anon: 200, owner: 302 } },
  "/sign-out": { get: all(302) },
  "/": { get: signedIn },
  "/sites/new": { get: signedIn, post: { anon: 302 } },
  "/settings": { get: signedIn, post: { anon: 302 } },
  "/admin": { get: { anon: 302, stranger: 404, mentor: 404, carer: 404, owner: 404 } },
  "/sites/:siteId": { get: member },
  "/sites/:siteId/edit": { get: ownerOnly, post: refuse(["owner"]) },
  "/sites/:siteId/spots/new": { get: ownerOnly, post: refuse(["owner"]) },
  "/sites/:siteId/spots/:spotId": { get: member, post: refuse(["owner", "carer"]) },
  "/sites/:siteId/spots/:spotId/edit": { get: ownerOnly, post: refuse(["owner"]) },
  "/sites/:siteId/sensors": { get: member },
  "/sites/:siteId/sensors/new": { get: ownerOnly, post: refuse(["owner"]) },
  "/sites/:siteId/sensors/:sensorId": { get: member, post: refuse(["owner", "carer"]) },
  "/sites/:siteId/import": { get: writers, post: refuse(["owner", "carer"]) },
  "/sites/:siteId/members": { get: member, post: refuse(["owner"]) },
  "/sites/:siteId/water": { get: member, post: refuse(["owner", "carer"]) },
  "/invite/:token": { get: all(404), post: { anon: 302, stranger: 404, mentor: 404, carer: 404, owner: 404 } },
  "/help/api": { get: signedIn },
  "/api/sites/:siteId/notes": { get: member, post: refuse(["owner", "mentor"]) },
  "/api/sites/:siteId/spots/:spotId/export": { get: member },
  "/api/admin/mail": { get: { anon: 302, stranger: 404, mentor: 404, carer: 404, owner: 404 } },
  "/sites/:siteId/compare": { get: member },
  "/sites/:siteId/plants": { get: member },
  "/sites/:siteId/plants/new": { get: ownerOnly, post: refuse(["owner"]) },
  "/sites/:siteId/plants/:plantKey": { get: member, post: refuse(["owner", "carer"]) },
  "/sites/:siteId/wishlist": { get: member, post: refuse(["owner", "carer"]) },
  "/sites/:siteId/alerts": { get: member, post: refuse(["owner", "carer", "mentor"]) },
  "/sites/:siteId/broker": { get: member, post: refuse(["owner"]) },
  "/sites/:siteId/spots/:spotId/alerts": { get: member, post: refuse(["owner"]) },
  "/api/sites/:siteId/alerts": { get: member },
  "/api/ingest": { get: all(405), post: all(401) },
  "/api/sites/:siteId/spots/:spotId/series": { get: member },
  "/api/sites/:siteId/spots/:spotId/latest": { get: member },
  "/api/sites/:siteId/spots/:spotId/fits": { get: member },
  "/api/sites/:siteId/sensors/:sensorId/status": { get: member },
};

function flatten(entries: RouteConfigEntry[], prefix = ""): string[] {
  const out: string[] = [];
  for (const e of entries) {
    const path = e.path !== undefined ? `${prefix}/${e.path}`.replace(/\/+/g, "/") : prefix;
    if (e.index || (e.path !== undefined && !e.children?.length)) out.push(path || "/");
    else if (e.path !== undefined && e.children?.length) out.push(path);
    if (e.children) out.push(...flatten(e.children, path));
  }
  return [...new Set(out.map((p) => (p.length > 1 ? p.replace(/\/$/, "") : p)))];
}

const ROUTES = flatten(routes as RouteConfigEntry[]);
const fill = (p: string) =>
  p.replace(":siteId", "1").replace(":spotId", "1").replace(":sensorId", "1").replace(":plantKey", "phalaenopsis");

async function contextFor(baseURL: string, who: Who): Promise<APIRequestContext> {
  const ctx = await playwrightRequest.newContext({ baseURL, maxRedirects: 0 });
  if (who === "anon") return ctx;
  let creds: { email: string; password: string };
  if (who === "stranger") {
    creds = { email: `stranger${Date.now()}@example.test`, password: "a stranger's password" };
    const res = await ctx.post("/sign-up", { form: { name: "Stranger", ...creds } });
    expect(res.status()).toBe(302);
    // The stranger owns a site of their own, so they are "a member of another site".
    await ctx.post("/sites/new", {
      form: { name: "Elsewhere", latitude: "40", longitude: "-74", timeZone: "America/New_York" },
    });
    return ctx;
  }
  creds = DEMO[who];
  const res = await ctx.post("/sign-in", { form: creds });
  expect(res.status(), `sign-in as ${who}`).toBe(302);
  return ctx;
}

test("every route in app/routes.ts has an access expectation", () => {
  const missing = ROUTES.filter((r) => !EXPECT[r]);
  expect(missing, "routes without an entry in EXPECT").toEqual([]);
  expect(
    Object.keys(EXPECT).filter((k) => !ROUTES.includes(k)),
    "stale entries",
  ).toEqual([]);
});

for (const who of ["anon", "stranger", "mentor", "carer", "owner"] as Who[]) {
  test(`route walk as ${who}`, async ({ baseURL }) => {
    const ctx = await contextFor(baseURL!, who);
    const failures: string[] = [];
    for (const route of ROUTES) {
      const e = EXPECT[route];
      const url = fill(route);
      const want = e.get[who];
      if (want !== undefined) {
        const res = await ctx.get(url);
        if (res.status() !== want) failures.push(`GET ${url}: ${res.status()} (want ${want})`);
        // The same loader answers React Router's data requests.
        if (!route.startsWith("/api/") && want !== 302 && want !== 405) {
          const data = await ctx.get(`${url === "/" ? "/_root" : url}.data`);
          const wantData = want === 200 ? 200 : want;
          if (data.status() !== wantData && !(want === 200 && data.status() === 200))
            failures.push(`GET ${url}.data: ${data.status()} (want ${wantData})`);
        }
      }
      const wantPost = e.post?.[who];
      if (wantPost !== undefined) {
        const res = await ctx.post(url, { form: {} });
        if (res.status() !== wantPost) failures.push(`POST ${url}: ${res.status()} (want ${wantPost})`);
      }
    }
    // Another site's data, by id: the demo owner asking for the stranger's site and its API.
    if (who === "owner") {
      for (const url of [
        "/sites/2",
        "/api/sites/2/spots/1/series",
        "/sites/1/spots/999999",
        "/sites/1/sensors/999999",
        "/sites/2/compare?spots=1&spots=2",
        "/sites/2/wishlist",
        "/sites/1/plants/no-such-plant",
      ]) {
        const res = await ctx.get(url);
        if (res.status() !== 404) failures.push(`GET ${url}: ${res.status()} (want 404)`);
      }
    }
    expect(failures).toEqual([]);
    await ctx.dispose();
  });
}

test("actions refuse cross-origin posts (CSRF)", async ({ baseURL }) => {
  const ctx = await contextFor(baseURL!, "owner");
  const res = await ctx.post("/sites/1/spots/new", {
    form: { name: "Evil" },
    headers: { Origin: "http://evil.example" },
  });
  expect(res.status()).toBe(403);
  const res2 = await ctx.post("/sign-out", { headers: { "Sec-Fetch-Site": "cross-site" } });
  expect(res2.status()).toBe(403);
  await ctx.dispose();
});

test("sign-out revokes the session", async ({ baseURL }) => {
  const ctx = await contextFor(baseURL!, "carer");
  const state = await ctx.storageState();
  expect((await ctx.get("/sites/1")).status()).toBe(200);
  await ctx.post("/sign-out");
  // Replaying the old cookie after sign-out gets the sign-in redirect.
  const replay = await playwrightRequest.newContext({ baseURL, maxRedirects: 0, storageState: state });
  expect((await replay.get("/sites/1")).status()).toBe(302);
  await replay.dispose();
  await ctx.dispose();
});
