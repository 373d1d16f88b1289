// GET /api/sites/:siteId/spots/:spotId/fits: the fit of every plant group as facts and levels, for
// the period asked; it agrees with the spot page, words its facts in the member's unit, refuses
// malformed periods with a 400, and answers only members of the site.
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { createSession, generateSessionToken } from "~/.server/auth";
import { db } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { spots, users } from "~/db/schema.server";
import { loader as fitsLoader } from "~/routes/api.fits";
import { loader as spotLoader } from "~/routes/spots.$spotId";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const HOUR = 3_600_000;
type Args = { request: Request; params: Record<string, string>; context: unknown };
const req = (token: string, path: string) =>
  new Request(`http://127.0.0.1${path}`, { headers: { Cookie: `nw_session=${token}` } });
async function sessionFor(userId: number) {
  const token = generateSessionToken();
  await createSession(token, userId);
  return token;
}
async function status(p: Promise<unknown>) {
  try {
    const r = await p;
    return r instanceof Response ? r.status : 200;
  } catch (e) {
    if (e instanceof Response) return e.status;
    const x = e as { init?: { status?: number }; status?: number };
    return x.init?.status ?? x.status ?? 500;
  }
}

let site: { id: number };
let spot: { id: number };
let token: string;
let strangerToken: string;

beforeAll(async () => {
  const owner = await makeUser();
  site = await makeSite(owner, { timeZone: "Europe/London" });
  spot = await makeSpot(site, { indoor: true });
  const sensor = await makeSensor(site, spot, new Date("2024-12-01T00:00:00Z"));
  // 2025 in a heated room: 18 °C nights, 23 °C days, 55 %; one cold night of 13 °C for two hours on 17 January.
  const from = Date.UTC(2025, 0, 1);
  const hours = (Date.UTC(2026, 0, 1) - from) / HOUR;
  await new ReadingWriter().write(
    Array.from({ length: hours }, (_, i) => {
      const at = new Date(from + i * HOUR);
      const h = at.getUTCHours();
      const cold = at.getUTCMonth() === 0 && at.getUTCDate() === 17 && (h === 22 || h === 23);
      return {
        sensorId: sensor.id,
        measuredAt: at,
        temperature: cold ? 13 : h >= 8 && h < 20 ? 23 : 18,
        humidity: 55,
        lux: null,
        battery: null,
      };
    }),
  );
  token = await sessionFor(owner.id);
  strangerToken = await sessionFor((await makeUser()).id);
}, 120_000);

const fits = (t: string, query: string) =>
  fitsLoader({
    request: req(t, `/api/sites/${site.id}/spots/${spot.id}/fits${query}`),
    params: { siteId: String(site.id), spotId: String(spot.id) },
    context: {},
  } as Args as never) as Promise<Response>;

describe("the fits route", () => {
  it("lists every group with a level code, the verdict, each rule's facts, and the period judged", async () => {
    const body = await (await fits(token, "?from=2025-01&to=2025-12")).json();
    expect(body.period).toMatchObject({
      firstMonth: "2025-01",
      lastMonth: "2025-12",
      toToday: false,
      from: "2025-01-01T00:00:00.000Z",
      to: "2026-01-01T00:00:00.000Z",
    });
    expect(body.fits.length).toBeGreaterThan(20);
    const phal = body.fits.find((f: { key: string }) => f.key === "phalaenopsis");
    // One cold night above its 10 °C damage line is a caution, and light unknown never gives the top verdict.
    expect(phal).toMatchObject({ level: "care", verdict: "possible with care" });
    const cold = phal.rules.find((r: { rule: string }) => r.rule === "cold-nights");
    expect(cold).toMatchObject({
      level: "care",
      facts: [{ kind: "cold-snap", nights: 1, worst: [{ date: "2025-01-17", valueC: 13, hours: 2 }] }],
    });
    expect(cold.text).toContain("17 Jan: 13 °C for 2 hours");
    expect(phal.rules.find((r: { rule: string }) => r.rule === "light")).toMatchObject({ level: "unknown" });
    for (const f of body.fits) expect(["good", "care", "poor", "unknown"]).toContain(f.level);
  });

  it("agrees with the spot page, and words the facts in °F for a member who chose it", async () => {
    const page = (await spotLoader({
      request: req(token, `/sites/${site.id}/spots/${spot.id}?period=2025-12`),
      params: { siteId: String(site.id), spotId: String(spot.id) },
      context: {},
    } as never)) as {
      fits: { key: string; verdict: string }[];
    };
    const body = await (await fits(token, "?to=2025-12")).json();
    expect(body.fits.map((f: { key: string; verdict: string }) => [f.key, f.verdict])).toEqual(
      page.fits.map((f) => [f.key, f.verdict]),
    );

    const fan = await makeUser();
    await db().update(users).set({ temperatureUnit: "F" }).where(eq(users.id, fan.id));
    const { addMember } = await import("./helpers");
    await addMember(site, fan, "mentor");
    const inF = await (await fits(await sessionFor(fan.id), "?from=2025-01&to=2025-12")).json();
    const cold = inF.fits
      .find((f: { key: string }) => f.key === "phalaenopsis")
      .rules.find((r: { rule: string }) => r.rule === "cold-nights");
    expect(cold.text).toContain("17 Jan: 55.4 °F for 2 hours");
    expect(cold.facts[0].worst[0].valueC).toBe(13); // facts stay in °C
  });

  it("refuses malformed or impossible periods with a 400 and a reason", async () => {
    for (const q of [
      "?from=2025-13",
      "?to=25-01",
      "?from=2025-06&to=2025-01",
      "?from=2020-01&to=2025-12",
      "?from=2999-01",
      "?glazing=paper",
    ]) {
      const r = await fits(token, q).catch((e) => e as Response);
      expect(r.status, q).toBe(400);
      expect((await r.json()).error, q).toBeTruthy();
    }
  });

  it("answers only members of the site", async () => {
    expect(await status(fits(strangerToken, ""))).toBe(404);
  });
});

describe("cold glass on a windowsill (ISO 6946 surface resistance, REFERENCES.md)", () => {
  it("with single glazing and a freezing January outside, the pane sits under the room's dew point; with triple it doesn't", async () => {
    const owner = await makeUser();
    const s = await makeSite(owner, { timeZone: "Europe/London" });
    const sill = await makeSpot(s, { indoor: true, name: "Sill" });
    await db().update(spots).set({ facing: "N" }).where(eq(spots.id, sill.id));
    const outside = await makeSpot(s, { indoor: false, name: "Yard" });
    const inSensor = await makeSensor(s, sill, new Date("2024-12-01T00:00:00Z"));
    const outSensor = await makeSensor(s, outside, new Date("2024-12-01T00:00:00Z"));
    // January 2025: 20 °C and 60 % inside (dew point ~12 °C), 0 °C outside.
    const from = Date.UTC(2025, 0, 1);
    const readings = Array.from({ length: 31 * 24 }, (_, i) => new Date(from + i * HOUR)).flatMap((at) => [
      { sensorId: inSensor.id, measuredAt: at, temperature: 20, humidity: 60, lux: null, battery: null },
      { sensorId: outSensor.id, measuredAt: at, temperature: 0, humidity: 90, lux: null, battery: null },
    ]);
    await new ReadingWriter().write(readings);
    const t = await sessionFor(owner.id);
    const ask = async (glazing: string | null) => {
      const query = `?from=2025-01&to=2025-01${glazing === null ? "" : `&glazing=${glazing}`}`;
      const r = (await fitsLoader({
        request: req(t, `/api/sites/${s.id}/spots/${sill.id}/fits${query}`),
        params: { siteId: String(s.id), spotId: String(sill.id) },
        context: {},
      } as never)) as Response;
      const body = await r.json();
      return {
        body,
        wet: body.fits
          .find((f: { key: string }) => f.key === "phalaenopsis")
          .rules.find((x: { rule: string }) => x.rule === "condensation"),
      };
    };
    const single = await ask("single");
    expect(single.body.glazing).toEqual({ glazing: "single", uValue: 5.8 });
    expect(single.wet.level).toBe("care");
    const glassFact = single.wet.facts.find((f: { kind: string }) => f.kind === "cold-glass");
    expect(glassFact.months[0]).toMatchObject({ month: 1 });
    expect(glassFact.months[0].paneC).toBeCloseTo(4.9, 0);
    expect(single.wet.text).toContain("Cold glass");
    const triple = await ask("triple");
    expect(triple.wet.facts.some((f: { kind: string }) => f.kind === "cold-glass")).toBe(false);
    // Without the query, the glazing stored with the spot (its edit form) is judged.
    expect((await ask(null)).body.glazing).toBeNull();
    await db().update(spots).set({ glazing: "single" }).where(eq(spots.id, sill.id));
    expect((await ask(null)).body.glazing).toEqual({ glazing: "single", uValue: 5.8 });
  }, 60_000);
});
