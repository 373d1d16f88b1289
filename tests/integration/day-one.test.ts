// The day-one view of a new spot (issue 16, part 5) and the plant page and wishlist judging with
// projections (part 4): spots with a few days and a few weeks of simulated readings written through
// the writer, against the outdoor weather the job fetched from the local fake (as projection-fit.test.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createSession, generateSessionToken } from "~/.server/auth";
import { pool } from "~/.server/db";
import { WeatherJob } from "~/.server/weather/job";
import { loadHours } from "~/.server/weather/store";
import { saveWish } from "~/.server/plants";
import { loader as spotLoader } from "~/routes/spots.$spotId";
import { loader as plantLoader } from "~/routes/plants.$plantKey";
import { loader as wishlistLoader } from "~/routes/wishlist";
import type { DayOneView } from "~/components/day-one";
import { DEMO_SITE, type SimSpot } from "../../simulator/model";
import { startWeatherFake, type WeatherFake } from "../../simulator/weather-fake";
import { makeSite, makeUser, simulatedSpot } from "./helpers";

const DAY = 86_400_000;
const NOW = new Date();
let fake: WeatherFake;
let site: Awaited<ReturnType<typeof makeSite>>;
let owner: Awaited<ReturnType<typeof makeUser>>;
let token: string;
type Args = { request: Request; params: Record<string, string>; context: unknown };

async function spotWithDays(sim: SimSpot, days: number, seed: number, name: string) {
  return simulatedSpot(site, sim, { days, seed, name, now: NOW });
}

const call = async <T>(loader: (a: never) => unknown, url: string, params: Record<string, string>) =>
  (await loader({
    request: new Request(`http://127.0.0.1${url}`, { headers: { Cookie: `nw_session=${token}` } }),
    params,
    context: {},
  } as Args as never)) as T;

type SpotPage = { dayOne: DayOneView | null; fits: { key: string; verdict: string; confidence?: string }[] };
const spotPage = (spotId: number) =>
  call<SpotPage>(spotLoader as never, `/sites/${site.id}/spots/${spotId}`, {
    siteId: String(site.id),
    spotId: String(spotId),
  });

let weeks: { id: number };
let days: { id: number };
let empty: { id: number };

beforeAll(async () => {
  fake = await startWeatherFake({ now: () => NOW.getTime() });
  owner = await makeUser();
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
  const sill: SimSpot = { kind: "windowsill", facing: "E", hasLight: false };
  weeks = await spotWithDays(sill, 25, 301, "East sill, 25 days");
  days = await spotWithDays(sill, 3, 302, "East sill, 3 days");
  empty = await spotWithDays(sill, 0, 303, "East sill, no sensor");
}, 240_000);
afterAll(() => fake.close());

describe("the day-one view of a new spot", () => {
  it("after three days: the outdoor climate by month, the days against outdoors, and the date the likely verdicts come", async () => {
    const page = await spotPage(days.id);
    const v = page.dayOne!;
    expect(v).not.toBeNull();
    expect(v.daysWithReadings).toBeGreaterThanOrEqual(2);
    expect(v.weather).toBe("ready");
    // Three past years from the fake, every month, January colder than July at 53° N (common knowledge of a temperate climate).
    expect(v.climate!.years).toBe(3);
    expect(v.climate!.months.map((m) => m.month)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    const jan = v.climate!.months[0];
    const jul = v.climate!.months[6];
    expect(jan.meanDailyLowC).toBeLessThan(jul.meanDailyLowC);
    expect(jan.meanDailyLowC).toBeLessThan(jan.meanDailyHighC);
    expect(jan.coldestLowC).toBeLessThanOrEqual(jan.meanDailyLowC);
    // The same figure read straight from the stored weather: January's mean daily low over the three years (UTC days, so within 0.5 °C).
    const y = NOW.getUTCFullYear();
    const lows: number[] = [];
    for (let yr = y - 3; yr < y; yr++) {
      const h = await loadHours(site.id, new Date(Date.UTC(yr, 0, 1)), new Date(Date.UTC(yr, 1, 1)));
      for (let d = 0; d < 31; d++) lows.push(Math.min(...Array.from(h.temperature.subarray(d * 24, d * 24 + 24))));
    }
    expect(Math.abs(lows.reduce((a, b) => a + b, 0) / lows.length - jan.meanDailyLowC)).toBeLessThan(0.5);
    // A December windowsill indoors runs above the outdoor air at night (a heated house behind it: common practice).
    expect(v.versus!.days).toBeGreaterThanOrEqual(2);
    expect(v.versus!.nightAboveC!).toBeGreaterThan(2);
    expect(v.versus!.nightAboveC!).toBeCloseTo(v.versus!.nightSpotC! - v.versus!.nightOutC!, 0);
    // Too few days for the model: it says when the likely verdicts come, within the next week.
    expect(v.model.state).toBe("waiting");
    const expected = (v.model as { expected: string }).expected;
    expect(expected).toMatch(/^\d{1,2} \w{3} \d{4}$/);
    expect(Date.parse(`${expected} 12:00 UTC`)).toBeLessThan(NOW.getTime() + 8 * DAY);
    expect(v.likely).toEqual([]);
    expect(page.fits.every((f) => f.confidence === "measured")).toBe(true);
  });

  it("after three and a half weeks: the model's likely verdicts, their basis and the date of the first firm answer", async () => {
    const v = (await spotPage(weeks.id)).dayOne!;
    expect(v.model.state).toBe("fitted");
    const m = v.model as Extract<DayOneView["model"], { state: "fitted" }>;
    expect(m.years).toBe(3);
    expect(m.firmBy).toMatch(/^\d{1,2} \w{3} \d{4}$/);
    expect(Date.parse(`${m.firmBy} 12:00 UTC`)).toBeGreaterThan(NOW.getTime() + 300 * DAY);
    expect(v.likely.length).toBeGreaterThan(0);
    expect(v.likely.flatMap((l) => l.names).length).toBeGreaterThan(0);
    expect(v.basis).toMatch(/(\d+ of 12 months measured|No month measured yet).*projected from 3 past years/);
    expect(v.versus!.nightAboveC!).toBeGreaterThan(2);
  });

  it("a spot without readings shows what is known without a sensor: climate and sun", async () => {
    const v = (await spotPage(empty.id)).dayOne!;
    expect(v.daysWithReadings).toBe(0);
    expect(v.versus).toBeNull();
    expect(v.climate!.months).toHaveLength(12);
    expect(v.likely).toEqual([]);
  });

  it("a past period chosen shows no day-one view", async () => {
    const lastMonth = new Date(Date.UTC(NOW.getUTCFullYear(), NOW.getUTCMonth() - 1, 15)).toISOString().slice(0, 7);
    const page = await call<SpotPage>(spotLoader as never, `/sites/${site.id}/spots/${weeks.id}?period=${lastMonth}`, {
      siteId: String(site.id),
      spotId: String(weeks.id),
    });
    expect(page.dayOne).toBeNull();
  });
});

describe("the plant page and the wishlist judge unmeasured months from projections", () => {
  // A plant whose verdict on the 25-day sill rests on projected months (the spot page's own fits say which).
  let key = "";
  beforeAll(async () => {
    const spot = await spotPage(weeks.id);
    key = spot.fits.find(
      (f) => f.confidence !== "measured" && f.verdict !== "not enough data yet" && f.verdict !== "struggles here",
    )!.key;
  });

  it("the plant page marks the spot with a model 'likely', with its basis; the three-day spot stays not judged", async () => {
    const page = await call<{ spots: { id: number; verdict: string; likely: boolean; basisText: string | null }[] }>(
      plantLoader as never,
      `/sites/${site.id}/plants/${key}`,
      {
        siteId: String(site.id),
        plantKey: key,
      },
    );
    const w = page.spots.find((s) => s.id === weeks.id)!;
    expect(w.verdict).not.toBe("not enough data yet");
    expect(w.likely).toBe(true);
    expect(w.basisText).toMatch(/projected from 3 past years of weather; firm by/);
    // The same verdict as the spot page.
    const spot = await spotPage(weeks.id);
    expect(w.verdict).toBe(spot.fits.find((f) => f.key === key)!.verdict);
    const d = page.spots.find((s) => s.id === days.id)!;
    expect(d.likely).toBe(false);
  });

  it("the wishlist's best spot carries 'likely' when its verdict rests on projected months", async () => {
    await saveWish(site.id, owner.id, { plantKey: key, mustHave: false, pots: 1 });
    const page = await call<{
      rows: { plantKey: string; best: { spot: string; verdict: string; likely: boolean } | null }[];
    }>(wishlistLoader as never, `/sites/${site.id}/wishlist`, {
      siteId: String(site.id),
    });
    const row = page.rows.find((r) => r.plantKey === key)!;
    expect(row.best!.spot).toBe("East sill, 25 days");
    expect(row.best!.verdict).not.toBe("not enough data yet");
    expect(row.best!.likely).toBe(true);
  });
});
