// projectedProfile: two weeks of a simulated east windowsill and a bench, written through the
// writer like real readings, against the outdoor weather the job fetched from the local fake.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { projectedProfile, spotForecast } from "~/.server/projections";
import { WeatherJob } from "~/.server/weather/job";
import { DEMO_SITE, type SimSpot } from "../../simulator/model";
import { startWeatherFake, type WeatherFake } from "../../simulator/weather-fake";
import { makeSite, makeSpot, makeUser, simulatedSpot } from "./helpers";

const DAY = 86_400_000;
const NOW = new Date();
let fake: WeatherFake;
let site: Awaited<ReturnType<typeof makeSite>>;

async function spotWithDays(sim: SimSpot, indoor: boolean, days: number, seed: number) {
  return simulatedSpot(site, sim, { indoor, days, seed, now: NOW });
}

beforeAll(async () => {
  fake = await startWeatherFake({ now: () => NOW.getTime() });
  site = await makeSite(await makeUser(), { latitude: DEMO_SITE.latitude });
  await pool().query(`SELECT ensure_reading_partitions(date_trunc('month', now()) - interval '2 months', 4)`);
});
afterAll(() => fake.close());

describe("projectedProfile", () => {
  it("says the weather is not fetched yet, without waiting for it, before the job has run", async () => {
    const spot = await makeSpot(site, { indoor: false });
    const p = await projectedProfile(spot.id, { now: NOW });
    expect(p?.missing).toBe("weather-not-fetched");
    expect(p?.months).toEqual([]);
  });

  it("projects every month of a two-week-old spot from past years, with intervals, blending the month measured so far", async () => {
    const job = new WeatherJob({
      endpoints: { archiveUrl: `${fake.url}/v1/archive`, forecastUrl: `${fake.url}/v1/forecast` },
      years: 3,
      perRound: 50,
      now: () => NOW.getTime(),
    });
    await job.untilIdle();
    const sill = await spotWithDays({ kind: "windowsill", facing: "E", hasLight: false }, true, 15, 102);
    const p = (await projectedProfile(sill.id, { now: NOW, years: 3 }))!;
    expect(p.missing).toBeNull();
    expect(p.years).toHaveLength(3);
    expect(p.model?.quality?.daysHeldOut).toBe(3);
    expect(p.months.map((m) => m.month)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    const month = Number(new Date(NOW.toLocaleString("en-US", { timeZone: "Europe/London" })).getMonth() + 1);
    const measuredMonths = p.months.filter((m) => m.measuredDays > 0).map((m) => m.month);
    expect(measuredMonths).toContain(month);
    for (const m of p.months) {
      expect(["projected", "blended"]).toContain(m.source);
      const low = m.figures.meanDailyLow!;
      expect(low.low, `month ${m.month}`).toBeLessThanOrEqual(low.value);
      expect(low.high, `month ${m.month}`).toBeGreaterThanOrEqual(low.value);
      expect(m.figures.humidityMean).not.toBeNull();
      if (m.source === "projected") expect(low.high - low.low, `month ${m.month}`).toBeGreaterThan(0);
    }
    expect(p.firmBy!.getTime()).toBeGreaterThan(NOW.getTime() + 300 * DAY);
    // A heated kitchen's east sill stays far above an outdoor January's lows (DEMO_OUTDOOR_MONTHS: −6 … 0.5 °C).
    expect(p.months[0].figures.meanDailyLow!.value).toBeGreaterThan(8);
  });

  it("projects a bench close to the outdoor air: January's mean daily low within the outdoor range", async () => {
    const bench = await spotWithDays({ kind: "outdoor", facing: "none", hasLight: false }, false, 15, 101);
    const p = (await projectedProfile(bench.id, { now: NOW, years: 3 }))!;
    const jan = p.months[0].figures.meanDailyLow!;
    // The simulator's January nights at the demo site average about 1–2 °C (simulator/model.ts, DEMO_SCENARIO).
    expect(jan.value).toBeGreaterThan(-3);
    expect(jan.value).toBeLessThan(5);
    // Cached: the same answer object until a day passes or a day's readings arrive.
    expect(await projectedProfile(bench.id, { now: NOW, years: 3 })).toBe(p);
  });

  it("forecasts the bench's next 48 hours and nights from the stored forecast through its model", async () => {
    const bench = await spotWithDays({ kind: "outdoor", facing: "none", hasLight: false }, false, 15, 111);
    const f = (await spotForecast(bench.id, { now: NOW }))!;
    expect(f.hours).toHaveLength(48);
    expect(f.nights.length).toBeGreaterThanOrEqual(2);
    for (const n of f.nights) {
      expect(n.lowerBound).toBeLessThan(n.expectedLow);
      // Nights at the demo site, any month (DEMO_OUTDOOR_MONTHS: lowest −6 °C, highest 31.5 °C).
      expect(n.expectedLow).toBeGreaterThan(-12);
      expect(n.expectedLow).toBeLessThan(25);
    }
  });
});
