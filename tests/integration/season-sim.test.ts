// The season profile of a simulated year, written through the writer like real readings, against
// the simulator's own noise-free month extremes (outdoorMonthExtremes) and the published demo
// ranges (DEMO_OUTDOOR_MONTHS).
import { beforeAll, describe, expect, it } from "vitest";
import { ReadingWriter } from "~/.server/ingest/writer";
import { spotProfiles } from "~/.server/profiles";
import type { Reading } from "~/domain/ingest/payload";
import type { SeasonProfile } from "~/domain/season/types";
import { DEMO_OUTDOOR_MONTHS, DEMO_SCENARIO, DEMO_SITE, generate, outdoorMonthExtremes } from "../../simulator/model";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const YEAR = 2025;
const from = new Date(Date.UTC(YEAR, 0, 1)); // Europe/London is on GMT in January: local midnight
const to = new Date(Date.UTC(YEAR + 1, 0, 1));
/**
 * Tolerances, and why: the sensor adds ±0.2 °C of triangular noise and rounds to 0.1 °C; it
 * samples every 10 minutes like outdoorMonthExtremes, but drops out now and then, so an extreme
 * can fall in a gap — the spot's extremes are within 0.6 °C of the model's. Mean daily lows and
 * highs average the noise away: within 0.3 °C.
 */
const EXTREME_TOLERANCE_C = 0.6;
const MEAN_TOLERANCE_C = 0.3;

let months: SeasonProfile["months"];

beforeAll(async () => {
  const user = await makeUser();
  const site = await makeSite(user, { timeZone: DEMO_SITE.timeZone, latitude: DEMO_SITE.latitude });
  const spot = await makeSpot(site, { indoor: false });
  const sensor = await makeSensor(site, spot, new Date(Date.UTC(YEAR - 1, 11, 1)));
  const w = new ReadingWriter();
  let batch: Reading[] = [];
  const pending: Promise<unknown>[] = [];
  for (const r of generate(DEMO_SITE, { kind: "outdoor", facing: "none", hasLight: false }, DEMO_SCENARIO, {
    from,
    to,
    intervalMs: 600_000,
    sensorSeed: 101,
  })) {
    batch.push({
      sensorId: sensor.id,
      measuredAt: r.measuredAt,
      temperature: r.temperature,
      humidity: r.humidity,
      lux: null,
      battery: r.battery,
    });
    if (batch.length === 5000) {
      pending.push(w.write(batch));
      batch = [];
    }
  }
  pending.push(w.write(batch));
  await Promise.all(pending);
  const profiles = await spotProfiles(site, [spot.id], to, { range: { from, to } });
  months = profiles.get(spot.id)!.months;
}, 120_000);

describe("season profile of a simulated year", () => {
  it("has every month of the year, fully covered", () => {
    expect(months.map((m) => m.key)).toEqual(
      Array.from({ length: 12 }, (_, i) => `${YEAR}-${String(i + 1).padStart(2, "0")}`),
    );
    for (const m of months) expect(m.coverage.enough, m.key).toBe(true);
  });

  it(`matches the simulator's month extremes within ${EXTREME_TOLERANCE_C} °C and its mean daily lows and highs within ${MEAN_TOLERANCE_C} °C`, () => {
    const truth = outdoorMonthExtremes(DEMO_SITE, DEMO_SCENARIO, YEAR);
    for (const m of months) {
      const t = truth[m.month - 1];
      expect(
        Math.abs(m.temperature.lowest! - t.lowest),
        `${m.key} lowest ${m.temperature.lowest} vs ${t.lowest}`,
      ).toBeLessThanOrEqual(EXTREME_TOLERANCE_C);
      expect(
        Math.abs(m.temperature.highest! - t.highest),
        `${m.key} highest ${m.temperature.highest} vs ${t.highest}`,
      ).toBeLessThanOrEqual(EXTREME_TOLERANCE_C);
      expect(Math.abs(m.temperature.meanDailyLow! - t.meanDailyLow), `${m.key} mean daily low`).toBeLessThanOrEqual(
        MEAN_TOLERANCE_C,
      );
      expect(Math.abs(m.temperature.meanDailyHigh! - t.meanDailyHigh), `${m.key} mean daily high`).toBeLessThanOrEqual(
        MEAN_TOLERANCE_C,
      );
    }
  });

  it("falls inside the demo scenario's published month ranges (DEMO_OUTDOOR_MONTHS)", () => {
    for (const m of months) {
      const r = DEMO_OUTDOOR_MONTHS[m.month - 1];
      expect(m.temperature.lowest!, `${m.key} lowest`).toBeGreaterThanOrEqual(r.lowest[0] - EXTREME_TOLERANCE_C);
      expect(m.temperature.lowest!, `${m.key} lowest`).toBeLessThanOrEqual(r.lowest[1] + EXTREME_TOLERANCE_C);
      expect(m.temperature.highest!, `${m.key} highest`).toBeGreaterThanOrEqual(r.highest[0] - EXTREME_TOLERANCE_C);
      expect(m.temperature.highest!, `${m.key} highest`).toBeLessThanOrEqual(r.highest[1] + EXTREME_TOLERANCE_C);
    }
  });

  it("orders the percentiles inside the extremes", () => {
    for (const m of months) {
      const t = m.temperature;
      expect(t.lowest!).toBeLessThanOrEqual(t.p05!);
      expect(t.p05!).toBeLessThan(t.p95!);
      expect(t.p95!).toBeLessThanOrEqual(t.highest!);
    }
  });
});
