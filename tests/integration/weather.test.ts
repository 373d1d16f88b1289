// Outdoor weather: the job fetches a site's weather once from the local fake of the hosted service
// (the same endpoints and JSON as Open-Meteo's documented API), stores it compactly, tops it up,
// and a service that is down or slow fails the fetch, never the caller.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/.server/db";
import { fetchHourly, WeatherServiceError } from "~/.server/weather/client";
import { WeatherJob } from "~/.server/weather/job";
import { loadHours, weatherStatus } from "~/.server/weather/store";
import { DEMO_HOUSEHOLD } from "../../simulator/demo";
import { DEMO_SCENARIO, DEMO_SITE, outdoorWeather, scenarioAt } from "../../simulator/model";
import { startWeatherFake, type WeatherFake } from "../../simulator/weather-fake";
import { makeSite, makeUser } from "./helpers";

const NOW = Date.UTC(2026, 10, 20, 9, 30);
const DAY = 86_400_000;
let fake: WeatherFake;
let endpoints: { archiveUrl: string; forecastUrl: string; timeoutMs: number };

beforeAll(async () => {
  fake = await startWeatherFake({ now: () => NOW });
  endpoints = { archiveUrl: `${fake.url}/v1/archive`, forecastUrl: `${fake.url}/v1/forecast`, timeoutMs: 2000 };
});
afterAll(() => fake.close());

describe("weather service fake", () => {
  it("speaks the service's JSON: hourly.time in unixtime, units, UTC offset, and nulls past the archive's end", async () => {
    const res = await fetch(
      `${fake.url}/v1/archive?latitude=51.7&longitude=-2.2&start_date=2026-11-14&end_date=2026-11-16` +
        "&hourly=temperature_2m,cloud_cover&timezone=GMT&timeformat=unixtime",
    );
    const body = await res.json();
    expect(res.status).toBe(200);
    expect(body.hourly_units).toEqual({ time: "unixtime", temperature_2m: "°C", cloud_cover: "%" });
    expect(body.utc_offset_seconds).toBe(0);
    expect(body.hourly.time).toHaveLength(72);
    expect(body.hourly.time[0]).toBe(Date.UTC(2026, 10, 14) / 1000);
    // The archive lags five days behind its clock (20 Nov 09:30): 15 Nov 09:00 is its last hour.
    expect(body.hourly.temperature_2m[24 + 9]).not.toBeNull();
    expect(body.hourly.temperature_2m[24 + 10]).toBeNull();
  });

  it("serves the climate the demo's sensors are generated from, hour by hour", async () => {
    expect(DEMO_HOUSEHOLD.scenario).toBe(DEMO_SCENARIO);
    expect(scenarioAt(DEMO_HOUSEHOLD.site.latitude, DEMO_HOUSEHOLD.site.longitude)).toBe(DEMO_SCENARIO);
    const series = await fetchHourly(endpoints, DEMO_SITE, {
      kind: "archive",
      startDate: "2024-01-01",
      endDate: "2024-01-02",
    });
    const truth = outdoorWeather(DEMO_SITE, DEMO_SCENARIO);
    for (let i = 0; i < 48; i += 7) {
      expect(series.temperature[i]).toBeCloseTo(truth(new Date(series.start + i * 3_600_000)).temperature, 1);
    }
  });

  it("answers bad parameters with a 400 and the service's { error, reason } body", async () => {
    for (const q of [
      "latitude=91&longitude=0&start_date=2024-01-01&end_date=2024-01-02&hourly=temperature_2m",
      "latitude=1&longitude=0&start_date=2024-01-01&end_date=2024-01-02&hourly=snowfall_depth_x",
      "latitude=1&longitude=0&start_date=2020-01-01&end_date=2024-01-02&hourly=temperature_2m",
    ]) {
      const res = await fetch(`${fake.url}/v1/archive?${q}`);
      expect(res.status, q).toBe(400);
      expect((await res.json()).error).toBe(true);
    }
  });
});

describe("weather job", () => {
  it("fetches a new site's forecast and past years once, stores whole days compactly, and asks nothing more when done", async () => {
    const site = await makeSite(await makeUser());
    const job = new WeatherJob({ endpoints, years: 2, perRound: 50, now: () => NOW });
    expect((await weatherStatus(site.id)).state).toBe("not-fetched");
    await job.untilIdle();
    const status = await weatherStatus(site.id);
    expect(status.state).toBe("ready");
    if (status.state !== "ready") return;
    expect(status.archiveFrom).toBe("2024-01-01");
    expect(status.forecastAt?.getTime()).toBe(NOW);
    const hours = await loadHours(site.id, new Date(Date.UTC(2024, 0, 1)), new Date(NOW + 10 * DAY));
    expect(hours.temperature.slice(0, 24 * 365 * 2).some(Number.isNaN)).toBe(false);
    expect(hours.forecastFrom).toBeLessThan(hours.temperature.length);
    const truth = outdoorWeather(DEMO_SITE, DEMO_SCENARIO);
    expect(hours.temperature[1000]).toBeCloseTo(truth(new Date(hours.start + 1000 * 3_600_000)).temperature, 1);
    // The forecast reaches 16 days ahead.
    expect(Number.isNaN(hours.temperature[(NOW - hours.start) / 3_600_000 + 24 * 9])).toBe(false);

    const size = await pool().query<{ bytes: string; days: number }>(
      `SELECT sum(pg_column_size(w.*))::bigint AS bytes, count(*)::int AS days FROM weather_days w WHERE site_id = $1`,
      [site.id],
    );
    const perYear = (Number(size.rows[0].bytes) / size.rows[0].days) * 365;
    console.log(
      `weather stored: ${size.rows[0].days} days, ${Math.round(perYear / 1000)} kB per site-year (rows, before the index)`,
    );
    expect(perYear).toBeLessThan(400_000);

    const before = fake.requests.length;
    await job.round();
    expect(fake.requests.length).toBe(before);
  });

  it("tops up: the forecast every 3 hours, the archive's new days daily; a moved site starts afresh", async () => {
    const site = await makeSite(await makeUser());
    await new WeatherJob({ endpoints, years: 1, perRound: 50, now: () => NOW }).untilIdle();
    const before = await weatherStatus(site.id);

    const later = NOW + 2 * DAY;
    const fakeLater = await startWeatherFake({ now: () => later });
    try {
      const job = new WeatherJob({
        endpoints: {
          ...endpoints,
          archiveUrl: `${fakeLater.url}/v1/archive`,
          forecastUrl: `${fakeLater.url}/v1/forecast`,
        },
        years: 1,
        perRound: 50,
        now: () => later,
      });
      await job.untilIdle();
      // Every site of the database is topped up; this one with a forecast and the archive's two new days.
      const asked = fakeLater.requests.filter((r) => r.query.includes(`latitude=51.7000`));
      expect(asked.some((r) => r.path === "/v1/forecast")).toBe(true);
      expect(asked.some((r) => r.path === "/v1/archive")).toBe(true);
      const after = await weatherStatus(site.id);
      if (before.state !== "ready" || after.state !== "ready") throw new Error("not ready");
      expect(Date.parse(after.archiveTo!) - Date.parse(before.archiveTo!)).toBe(2 * DAY);
      expect(after.archiveFrom).toBe(before.archiveFrom);
    } finally {
      await fakeLater.close();
    }

    // Moved 2° east: the weather of the old place goes, the new place's is fetched.
    await pool().query(`UPDATE sites SET longitude = 0.2 WHERE id = $1`, [site.id]);
    const job = new WeatherJob({ endpoints, years: 1, perRound: 50, now: () => NOW });
    await job.round();
    const moved = await pool().query<{ longitude: number; archive_from: string | null }>(
      `SELECT longitude, archive_from FROM weather_fetches WHERE site_id = $1`,
      [site.id],
    );
    expect(moved.rows[0].longitude).toBe(0.2);
    await job.untilIdle();
    expect(fake.requests.some((r) => r.query.includes("longitude=0.2000"))).toBe(true);
    expect((await weatherStatus(site.id)).state).toBe("ready");
  });

  it("a service that is down or slow fails the fetch quickly, backs off, and leaves the status 'not fetched'", async () => {
    const site = await makeSite(await makeUser());
    const job = new WeatherJob({
      endpoints: { ...endpoints, timeoutMs: 300 },
      years: 1,
      perRound: 200,
      now: () => NOW,
    });
    try {
      fake.mode = "down";
      await job.round();
      let status = await weatherStatus(site.id);
      expect(status.state).toBe("not-fetched");
      expect(status.lastError).toMatch(/503/);
      fake.mode = "slow";
      await expect(
        fetchHourly({ ...endpoints, timeoutMs: 300 }, DEMO_SITE, { kind: "forecast", pastDays: 1, forecastDays: 1 }),
      ).rejects.toBeInstanceOf(WeatherServiceError);
      status = await weatherStatus(site.id);
      expect(status.state).toBe("not-fetched");
      const next = await pool().query<{ next_attempt_at: Date; failures: number }>(
        `SELECT next_attempt_at, failures FROM weather_fetches WHERE site_id = $1`,
        [site.id],
      );
      expect(next.rows[0].failures).toBe(1);
      expect(next.rows[0].next_attempt_at.getTime()).toBeGreaterThan(NOW);
    } finally {
      fake.mode = "up";
    }
    // Back once the back-off has passed.
    const later = new WeatherJob({ endpoints, years: 1, perRound: 200, now: () => NOW + 7 * 3_600_000 });
    await later.untilIdle();
    expect((await weatherStatus(site.id)).state).toBe("ready");
  });
});
