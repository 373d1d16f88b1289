// The fit on measured + projected months (issue 16, part 4) through the fits route: spots with
// three and a half weeks of simulated readings, written through the writer like real readings,
// against the outdoor weather the job fetched from the local fake (as projection.test.ts does).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { pool } from "~/.server/db";
import { WeatherJob } from "~/.server/weather/job";
import { fitProjections } from "~/.server/projections";
import { spotProfiles, windowOf } from "~/.server/profiles";
import { rankSpotsForPlant } from "~/domain/fit/verdict";
import { plantByKey } from "~/domain/plants/library";
import type { Fact } from "~/domain/fit/facts";
import { loader as fitsLoader } from "~/routes/api.fits";
import { loader as spotLoader } from "~/routes/spots.$spotId";
import { DEMO_SITE, type SimSpot } from "../../simulator/model";
import { startWeatherFake, type WeatherFake } from "../../simulator/weather-fake";
import { makeSite, makeUser, simulatedSpot } from "./helpers";

const DAY = 86_400_000;
const NOW = new Date();
const READ_DAYS = 25;
let fake: WeatherFake;
let site: Awaited<ReturnType<typeof makeSite>>;
let token: string;

type Args = { request: Request; params: Record<string, string>; context: unknown };
type Rule = {
  rule: string;
  level: string;
  confidence: string;
  likely?: string;
  months: string[];
  facts: Fact[];
  text: string;
};
type FitJson = { key: string; level: string; verdict: string; confidence: string; verdictText: string; rules: Rule[] };
type Body = {
  basis: {
    confidence: string;
    measuredMonths: number[];
    projectedMonths: number[];
    blendedMonths: number[];
    years: number;
    firmBy: string | null;
  };
  fits: FitJson[];
};

async function spotWithDays(sim: SimSpot, indoor: boolean, days: number, seed: number) {
  return simulatedSpot(site, sim, { indoor, days, seed, now: NOW });
}

const fitsOf = async (spotId: number, query = ""): Promise<Body> => {
  const res = (await fitsLoader({
    request: new Request(`http://127.0.0.1/api/sites/${site.id}/spots/${spotId}/fits${query}`, {
      headers: { Cookie: `nw_session=${token}` },
    }),
    params: { siteId: String(site.id), spotId: String(spotId) },
    context: {},
  } as Args as never)) as Response;
  return (await res.json()) as Body;
};

const projectedMonthsOf = (f: Fact): number[] =>
  "months" in f && f.kind.startsWith("projected-") ? (f.months as number[]) : [];

beforeAll(async () => {
  fake = await startWeatherFake({ now: () => NOW.getTime() });
  const owner = await makeUser();
  site = await makeSite(owner, { latitude: DEMO_SITE.latitude });
  token = generateSessionToken();
  await createSession(token, owner.id);
  await pool().query(`SELECT ensure_reading_partitions(date_trunc('month', now()) - interval '2 months', 4)`);
  const job = new WeatherJob({
    endpoints: { archiveUrl: `${fake.url}/v1/archive`, forecastUrl: `${fake.url}/v1/forecast` },
    years: 3,
    perRound: 50,
    now: () => NOW.getTime(),
  });
  await job.untilIdle();
}, 180_000);
afterAll(() => fake.close());

describe("fits on measured + projected months", () => {
  it("a spot with three and a half weeks of readings gets projected months and verdicts marked projected, 'likely', with the date they are firm", async () => {
    const sill = await spotWithDays({ kind: "windowsill", facing: "E", hasLight: false }, true, READ_DAYS, 202);
    const body = await fitsOf(sill.id);
    expect(["mixed", "projected"]).toContain(body.basis.confidence);
    // Every month is either measured or projected; none is both (measured months always win).
    const all = [...body.basis.measuredMonths, ...body.basis.projectedMonths].sort((a, b) => a - b);
    expect(all).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(body.basis.projectedMonths.length).toBeGreaterThanOrEqual(11);
    expect(body.basis.years).toBe(3);
    expect(body.basis.firmBy).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(new Date(`${body.basis.firmBy}T00:00:00Z`).getTime()).toBeGreaterThan(NOW.getTime() + 300 * DAY);
    // No longer "not enough data yet" for every plant: the projection answers, honestly marked.
    expect(body.fits.every((f) => f.verdict !== "not enough data yet")).toBe(true);
    const likely = body.fits.filter((f) => f.confidence !== "measured");
    expect(likely.length).toBeGreaterThan(0);
    for (const f of likely) {
      expect(f.verdictText, f.key).toMatch(
        new RegExp(
          `^likely ${f.verdict} — (\\d+ of 12 months measured|no month measured yet).*projected from 3 past years of weather; firm by \\d+ \\w+`,
        ),
      );
    }
    for (const f of body.fits) {
      for (const r of f.rules) {
        expect(["measured", "projected", "mixed"], `${f.key} ${r.rule}`).toContain(r.confidence);
        // Measured months always win: no projected fact names a measured month.
        for (const fact of r.facts)
          for (const m of projectedMonthsOf(fact))
            expect(body.basis.measuredMonths, `${f.key} ${r.rule} ${fact.kind}`).not.toContain(m);
      }
    }
    // A period that ended (last month and the eleven before) is judged on what was measured then, not projected.
    const lastMonth = new Date(Date.UTC(NOW.getUTCFullYear(), NOW.getUTCMonth() - 1, 15)).toISOString().slice(0, 7);
    const past = await fitsOf(sill.id, `?to=${lastMonth}`);
    expect(past.basis).toMatchObject({ confidence: "measured", projectedMonths: [] });
    expect(past.fits.every((f) => f.confidence === "measured" && !f.verdictText.startsWith("likely"))).toBe(true);
    // A fit table over many spots (a plant's page) gets the same projections in one call, and the same verdicts.
    const seasons = await spotProfiles(site, [sill.id], NOW);
    const many = await fitProjections(seasons, { now: NOW });
    expect(many.get(sill.id)!.months.map((m) => m.month)).toEqual(body.basis.projectedMonths);
    const phal = plantByKey("phalaenopsis")!;
    const [{ fit: byPlant }] = rankSpotsForPlant(phal, [
      {
        season: seasons.get(sill.id)!,
        window: windowOf(site, { facing: "E", indoor: true }),
        projection: many.get(sill.id),
      },
    ]);
    expect(byPlant.verdict).toBe(body.fits.find((f) => f.key === "phalaenopsis")!.verdict);
    expect(byPlant.confidence).toBe(body.fits.find((f) => f.key === "phalaenopsis")!.confidence);
    // The spot page says the same, in words beside the verdict.
    const page = (await spotLoader({
      request: new Request(`http://127.0.0.1/sites/${site.id}/spots/${sill.id}`, {
        headers: { Cookie: `nw_session=${token}` },
      }),
      params: { siteId: String(site.id), spotId: String(sill.id) },
      context: {},
    } as Args as never)) as { fits: { key: string; verdict: string; confidence?: string; verdictText?: string }[] };
    const byKey = new Map(body.fits.map((f) => [f.key, f]));
    for (const f of page.fits) {
      expect(f.verdict, f.key).toBe(byKey.get(f.key)!.verdict);
      expect(f.confidence, f.key).toBe(byKey.get(f.key)!.confidence);
    }
  });

  it("a projected-only poor never says 'struggles here': it is a likely warning at care; only measured cold rules a plant out", async () => {
    // The bench under the pear tree: December's measured nights are frosty at the demo site (simulator/model.ts),
    // past every tropical group's damage line — measured, so "struggles here" stands for those.
    const bench = await spotWithDays({ kind: "outdoor", facing: "none", hasLight: false }, false, READ_DAYS, 203);
    const body = await fitsOf(bench.id);
    expect(body.basis.projectedMonths.length).toBeGreaterThanOrEqual(11);
    for (const f of body.fits) {
      for (const r of f.rules) if (r.confidence === "projected") expect(r.level, `${f.key} ${r.rule}`).not.toBe("poor");
      if (f.verdict === "struggles here") {
        expect(f.confidence, f.key).toBe("measured");
        expect(
          f.rules.some((r) => r.level === "poor" && r.confidence === "measured"),
          f.key,
        ).toBe(true);
      }
      for (const r of f.rules.filter((x) => x.likely === "poor")) {
        expect(r.level).toBe("care");
        expect(r.text, `${f.key} ${r.rule}`).toMatch(/is likely to|are likely to/);
        expect(r.text).not.toMatch(/struggles here/);
      }
    }
    // The bench's summer is projected: cool growers get a likely warning about hot days, at care, from the projection alone.
    const projectedCare = body.fits.flatMap((f) =>
      f.rules.filter((r) => r.confidence === "projected" && r.level === "care"),
    );
    expect(projectedCare.length).toBeGreaterThan(0);
    for (const r of projectedCare) expect(r.text).toMatch(/likely/);
    // Phalaenopsis on a winter bench: ruled out by measured frost (common practice: harmed under 10 °C, library.ts).
    const phal = body.fits.find((f) => f.key === "phalaenopsis")!;
    expect(phal.verdict).toBe("struggles here");
    expect(phal.rules[0]).toMatchObject({ rule: "cold-nights", level: "poor", confidence: "measured" });
  });
});
