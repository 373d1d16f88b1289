// Issue 15, water: the routine-watering rule in µS/cm, the same whichever scale the meter uses, and
// pH judged only in water with buffer; through the water module and the page's action, against the
// real database. Thresholds are growers' rules of thumb (common practice, shared/REFERENCES.md).
import { describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { addWaterCheck, listWaterChecks } from "~/.server/water";
import { action as waterAction } from "~/routes/water";
import { makeSite, makeUser } from "./helpers";

const on = new Date("2025-05-01T11:00:00Z");

describe("water checks", () => {
  it("call rain at 10 ppm and pH 5.2 good (no buffer, pH not judged), and 200 µS/cm the same on either scale", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const add = (source: string, v: { ppm?: number; ec?: number; ecScale?: 0.5 | 0.7 | null; ph: number | null }) =>
      addWaterCheck(site.id, owner.id, {
        source,
        checkedOn: on,
        ppm: v.ppm ?? null,
        ec: v.ec ?? null,
        ecScale: v.ecScale ?? null,
        ph: v.ph,
      });
    await add("rain", { ppm: 10, ph: 5.2 });
    await add("filtered", { ec: 200, ecScale: 0.5, ph: 6 });
    await add("filtered", { ec: 200, ecScale: 0.7, ph: 6 });
    await add("tap", { ppm: 140, ecScale: 0.7, ph: 6 });
    await add("tap", { ppm: 140, ecScale: 0.5, ph: 6 });
    await add("tap", { ec: 300, ph: 5.2 });
    const list = await listWaterChecks(site.id);
    expect(list.map((c) => [c.source, c.verdict])).toEqual([
      ["rain", "good"],
      ["filtered", "good"],
      ["filtered", "good"],
      ["tap", "good"],
      ["tap", "avoid"],
      ["tap", "avoid"],
    ]);
    expect(list[0].buffered).toBe(false);
    expect(list[0].reasons[1]).toMatch(/not judged/);
    expect(list[3].ecExact).toBeCloseTo(200, 9);
    expect(list[5].reasons[1]).toMatch(/acidic/);
  });

  it("take a TDS reading with its meter's scale, and an EC reading without one", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    const token = generateSessionToken();
    await createSession(token, owner.id);
    const post = (form: Record<string, string>) =>
      waterAction({
        request: new Request(`http://127.0.0.1/sites/${site.id}/water`, {
          method: "POST",
          headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1" },
          body: new URLSearchParams({ intent: "log", checkedOn: "2025-05-01", ph: "", ...form }),
        }),
        params: { siteId: String(site.id) },
        context: {},
      } as never);
    expect(await post({ source: "tap", measure: "ppm", value: "120", scale: "0.7" })).toMatchObject({ ok: true });
    expect(await post({ source: "tap", measure: "ppm", value: "120", scale: "" })).toMatchObject({ ok: true });
    expect(await post({ source: "filtered", measure: "ec", value: "150", scale: "" })).toMatchObject({ ok: true });
    const list = await listWaterChecks(site.id);
    expect(list.map((c) => [c.ppm, c.ec, c.ecScale])).toEqual([
      [120, null, 0.7],
      [120, null, null],
      [null, 150, null],
    ]);
    // 120 ppm is 171 µS/cm on a 0.7 meter (within 200) but 240 on a 0.5 one: without the scale it asks.
    expect(list[0].reasons[0]).toMatch(/within/);
    expect(list[1].reasons[0]).toMatch(/meter's scale/);
  });
});
