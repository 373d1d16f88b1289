// Issue 15: a spot's light source sets the lux → PPFD factor of its DLI (it was always sunlight's,
// also on a shelf under LEDs), a lux sensor that clips is noticed, and a windowsill's glazing is
// kept for the cold-glass rule. Through the spots module, the real writer and the profile loader.
import { and, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { db, pool } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { rebuildRollups } from "~/.server/rollups/rebuild";
import { spotProfiles } from "~/.server/profiles";
import { createSpot, updateSpot } from "~/.server/spots";
import { auditLog, spots } from "~/db/schema.server";
import { action as spotEditAction } from "~/routes/spots.$spotId.edit";
import { makeSensor, makeSite, makeUser } from "./helpers";

const HOUR = 3_600_000;
const base = { name: "Shelf", indoor: true, facing: "E" as const, capacity: 4, notes: "" };

describe("light source and glazing per spot", () => {
  it("are stored, sun and not given by default, glazing only for a spot by a window, and audited", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const plain = await createSpot({ siteId: site.id, actorId: owner.id, values: base });
    expect(plain).toMatchObject({ lightSource: "sun", glazing: null });
    const sill = await createSpot({
      siteId: site.id,
      actorId: owner.id,
      values: { ...base, name: "Sill", lightSource: "mixed", glazing: "old_double" },
    });
    expect(sill).toMatchObject({ lightSource: "mixed", glazing: "old_double" });

    const { changes } = await updateSpot({
      siteId: site.id,
      actorId: owner.id,
      spot: sill,
      values: { ...base, name: "Sill", lightSource: "led", glazing: "triple" },
    });
    expect(changes).toMatchObject({ lightSource: ["mixed", "led"], glazing: ["old_double", "triple"] });
    const [led] = await db().select().from(spots).where(eq(spots.id, sill.id));
    expect(led).toMatchObject({ lightSource: "led", glazing: "triple" });

    // Moved away from the window: no glass to judge, the glazing is not kept.
    await updateSpot({
      siteId: site.id,
      actorId: owner.id,
      spot: led,
      values: { ...base, name: "Sill", facing: "none", lightSource: "led", glazing: "single" },
    });
    const [moved] = await db().select().from(spots).where(eq(spots.id, sill.id));
    expect(moved.glazing).toBeNull();

    // A caller that leaves both out (older code paths) changes neither.
    await updateSpot({
      siteId: site.id,
      actorId: owner.id,
      spot: moved,
      values: { ...base, name: "Sill 2", facing: "none" },
    });
    const [kept] = await db().select().from(spots).where(eq(spots.id, sill.id));
    expect(kept).toMatchObject({ name: "Sill 2", lightSource: "led" });

    const log = await db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.siteId, site.id), eq(auditLog.action, "spot.update")));
    expect(log).toHaveLength(3);
  });

  it("come through the edit form, and a bad value is a field error that changes nothing", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const spot = await createSpot({ siteId: site.id, actorId: owner.id, values: base });
    const token = generateSessionToken();
    await createSession(token, owner.id);
    const post = (form: Record<string, string>) =>
      spotEditAction({
        request: new Request(`http://127.0.0.1/sites/${site.id}/spots/${spot.id}/edit`, {
          method: "POST",
          headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1" },
          body: new URLSearchParams(form),
        }),
        params: { siteId: String(site.id), spotId: String(spot.id) },
        context: {},
      } as never);
    const form = {
      name: "Shelf",
      indoor: "indoor",
      facing: "SW",
      capacity: "4",
      notes: "",
      lightSource: "fluorescent",
      glazing: "double",
    };
    const bad = (await post({ ...form, lightSource: "candles" })) as { result?: { error?: Record<string, string[]> } };
    expect(bad.result?.error?.lightSource).toBeTruthy();
    expect((await db().select().from(spots).where(eq(spots.id, spot.id)))[0].lightSource).toBe("sun");
    const ok = await post(form);
    expect(ok).toBeInstanceOf(Response);
    expect((await db().select().from(spots).where(eq(spots.id, spot.id)))[0]).toMatchObject({
      lightSource: "fluorescent",
      glazing: "double",
      facing: "SW",
    });
    await post({ ...form, glazing: "" });
    expect((await db().select().from(spots).where(eq(spots.id, spot.id)))[0].glazing).toBeNull();
  });

  it("set the factor of the spot's DLI: the same lux under white LEDs is less plant light than daylight", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const window = await createSpot({ siteId: site.id, actorId: owner.id, values: { ...base, name: "Window" } });
    const shelf = await createSpot({
      siteId: site.id,
      actorId: owner.id,
      values: { ...base, name: "LED shelf", facing: "none", lightSource: "led" },
    });
    const a = await makeSensor(site, window);
    const b = await makeSensor(site, shelf);
    // 10,800 lux from 07:00 to 19:00 local (BST) on 10 June 2025, dark otherwise; every 10 minutes.
    const start = Date.parse("2025-06-09T23:00:00Z");
    const rows = Array.from({ length: 24 * 6 }, (_, k) => {
      const hour = Math.floor(k / 6);
      const lux = hour >= 7 && hour < 19 ? 10_800 : 0;
      return [a.id, b.id].map((sensorId) => ({
        sensorId,
        measuredAt: new Date(start + k * 10 * 60_000),
        temperature: 21,
        humidity: 55,
        lux,
        battery: null,
      }));
    }).flat();
    await new ReadingWriter().write(rows);
    const range = { from: new Date(start), to: new Date(start + 24 * HOUR) };
    const profiles = await spotProfiles(site, [window.id, shelf.id], new Date(), { range });
    // Sunlight: 10,800 / 54 × 0.0036 × 12 = 8.64 (REFERENCES check, Thimijan & Heins 1983);
    // white LED (70 lux per µmol, memory): 10,800 / 70 × 0.0036 × 12 ≈ 6.66.
    expect(profiles.get(window.id)!.days[0].dli).toBeCloseTo(8.64, 6);
    expect(profiles.get(shelf.id)!.luxPerPpfd).toBe(70);
    expect(profiles.get(shelf.id)!.days[0].dli).toBeCloseTo((10_800 / 70) * 0.0036 * 12, 6);
  });

  it("a lux chip that tops out in direct sun is noticed, from the hourly maxima the writer and a rebuild keep", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const bench = await createSpot({
      siteId: site.id,
      actorId: owner.id,
      values: { ...base, name: "Bench", indoor: false, facing: "S" },
    });
    const sensor = await makeSensor(site, bench);
    // Three sunny June days, a half-sine of daylight from 05:00 to 21:00 local peaking at 100 klux,
    // read by a chip that saturates at 65,535 ÷ 1.2 ≈ 54,612 lux (memory: BH1750-type chips).
    const CHIP = 65_535 / 1.2;
    const start = Date.parse("2025-06-09T23:00:00Z");
    const rows = Array.from({ length: 3 * 24 * 6 }, (_, k) => {
      const x = ((k % (24 * 6)) / 6 - 5) / 16;
      const lux = x > 0 && x < 1 ? Math.min(CHIP, 100_000 * Math.sin(Math.PI * x)) : 0;
      return {
        sensorId: sensor.id,
        measuredAt: new Date(start + k * 10 * 60_000),
        temperature: 20,
        humidity: 60,
        lux,
        battery: null,
      };
    });
    await new ReadingWriter().write(rows);
    const maxOf = async () =>
      (await pool().query<{ m: number }>("SELECT max(lux_max) AS m FROM hourly_rollups WHERE spot_id = $1", [bench.id]))
        .rows[0].m;
    expect(await maxOf()).toBeCloseTo(CHIP, 1);
    const range = { from: new Date(start), to: new Date(start + 3 * 24 * HOUR) };
    const clipped = async () => (await spotProfiles(site, [bench.id], new Date(), { range })).get(bench.id)!;
    const p = await clipped();
    expect(p.luxClipped).toMatchObject({ days: 3 });
    expect(p.luxClipped!.ceilingLux).toBeCloseTo(CHIP, 1);
    expect(p.year[5].luxClipped).toEqual(p.luxClipped);
    await rebuildRollups([bench.id]);
    expect(await maxOf()).toBeCloseTo(CHIP, 1);
    expect((await clipped()).luxClipped).toMatchObject({ days: 3 });
  });
});
