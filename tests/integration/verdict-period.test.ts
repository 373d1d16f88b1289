// The verdict judges the data the grower has: a spot whose readings are a year imported from a
// logger is judged on that year, not on the twelve months before today; a picker chooses another.
import { describe, expect, it } from "vitest";
import { ReadingWriter } from "~/.server/ingest/writer";
import { fetchRollups, loadRollups, rollupCacheState } from "~/.server/rollups/read";
import { fitsFor, judgedPeriods, parsePeriod, spotProfiles } from "~/.server/profiles";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const HOUR = 3_600_000;
// Judged in December 2026, as the grower in the issue did: periods are computed from this `now`.
const now = new Date("2026-12-02T10:00:00Z");

async function spotWith2025() {
  const user = await makeUser();
  const site = await makeSite(user, { timeZone: "Europe/London" });
  const spot = await makeSpot(site, { indoor: true });
  const sensor = await makeSensor(site, spot, new Date("2024-12-01T00:00:00Z"));
  const from = Date.UTC(2025, 0, 1);
  const hours = (Date.UTC(2026, 0, 1) - from) / HOUR;
  // An intermediate windowsill: nights about 14 °C, days about 22 °C (*memory*, typical of a heated room).
  await new ReadingWriter().write(
    Array.from({ length: hours }, (_, i) => {
      const h = new Date(from + i * HOUR).getUTCHours();
      return {
        sensorId: sensor.id,
        measuredAt: new Date(from + i * HOUR),
        temperature: h >= 8 && h < 20 ? 22 : 14,
        humidity: 60,
        lux: null,
        battery: null,
      };
    }),
  );
  return { site, spot };
}

const observed = (season: Awaited<ReturnType<typeof spotProfiles>> extends Map<number, infer S> ? S : never) =>
  season.months.filter((m) => m.coverage.enough).map((m) => m.key);

describe("the period a verdict judges", () => {
  it("a spot with only 2025 readings, judged in December 2026, is judged on 2025 by default", async () => {
    const { site, spot } = await spotWith2025();
    const { choice, problem } = parsePeriod(null, now, site.timeZone);
    expect(problem).toBeNull();
    const period = (await judgedPeriods(site, [spot.id], choice, now)).get(spot.id)!;
    expect(period).toMatchObject({ firstMonth: "2025-01", lastMonth: "2025-12", toToday: false });
    expect(period.from.toISOString()).toBe("2025-01-01T00:00:00.000Z");
    expect(period.to.toISOString()).toBe("2026-01-01T00:00:00.000Z");

    const season = (await spotProfiles(site, [spot.id], now, { periods: new Map([[spot.id, period]]) })).get(spot.id)!;
    expect(observed(season)).toEqual(
      ["01", "02", "03", "04", "05", "06", "07", "08", "09", "10", "11", "12"].map((m) => `2025-${m}`),
    );
    // Every month is there, so no fit asks to "leave the sensor where it is through November".
    for (const fit of fitsFor(season)) expect(fit.missingAdvice).toBeNull();

    // The old default, the twelve months to today, saw one month and eleven empty ones: the bug.
    const toToday = (await spotProfiles(site, [spot.id], now)).get(spot.id)!;
    expect(observed(toToday)).toEqual(["2025-12"]);
  });

  it("the picker judges the twelve months ending with the chosen month, and says when a choice is odd", async () => {
    const { site, spot } = await spotWith2025();
    const { choice } = parsePeriod("2026-06", now, site.timeZone);
    expect(choice).toEqual({ kind: "ending", month: "2026-06" });
    const period = (await judgedPeriods(site, [spot.id], choice, now)).get(spot.id)!;
    expect(period).toMatchObject({ firstMonth: "2025-07", lastMonth: "2026-06", toToday: false });
    const season = (await spotProfiles(site, [spot.id], now, { periods: new Map([[spot.id, period]]) })).get(spot.id)!;
    expect(observed(season)).toEqual(["2025-07", "2025-08", "2025-09", "2025-10", "2025-11", "2025-12"]);
    expect(fitsFor(season).some((f) => f.missingAdvice?.includes("June"))).toBe(true);

    expect(parsePeriod("2027-03", now, site.timeZone)).toMatchObject({
      choice: { kind: "ending", month: "2026-12" },
      problem: expect.stringMatching(/hasn't happened/),
    });
    expect(parsePeriod("13/2025", now, site.timeZone)).toMatchObject({
      choice: { kind: "latest" },
      problem: expect.stringMatching(/last month/),
    });
    // The current month runs to today.
    const current = (await judgedPeriods(site, [spot.id], { kind: "ending", month: "2026-12" }, now)).get(spot.id)!;
    expect(current).toMatchObject({ firstMonth: "2026-01", lastMonth: "2026-12", toToday: true });
    expect(current.to).toEqual(now);
  });

  it("the rollup cache keeps a past period beside the rolling year and serves both right", async () => {
    const { spot } = await spotWith2025();
    const past = { from: new Date("2025-01-01T00:00:00Z"), to: new Date("2026-01-01T00:00:00Z") };
    const rolling = { from: new Date(Date.now() - 365 * 24 * HOUR), to: new Date() };
    for (let i = 0; i < 2; i++) {
      for (const p of [past, rolling])
        expect((await loadRollups([spot.id], p.from, p.to)).get(spot.id)).toEqual(
          (await fetchRollups([spot.id], p.from, p.to)).get(spot.id),
        );
    }
    const keys = rollupCacheState.keys();
    expect(keys).toContain(spot.id);
    expect(keys).toContain(`${spot.id}:${past.from.getTime()}:${past.to.getTime()}`);
  });
});
