// A period's statistics through the season profile: light (DLI, a sensor that clips), condensation
// hours, percentiles and the profile's invariants.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { seasonProfile } from "~/domain/season/profile";
import type { HourlyRollup, Site } from "~/domain/season/types";
import { HOUR, hoursBetween, london, londonYear, rollup, yearOpts } from "~/domain/season/profile-fixture";

describe("seasonProfile — light and condensation", () => {
  const dayHours = (fromUtc: string) => hoursBetween(fromUtc, new Date(Date.parse(fromUtc) + 24 * HOUR).toISOString());

  it("integrates sunlight lux into DLI", () => {
    // Computed checks (REFERENCES): 10 klux of sunlight for 10 h → 6.67 mol m⁻² d⁻¹ (÷54,
    // Thimijan & Heins 1983; DLI = Σ PPFD·Δt/10⁶, Torres & Lopez, Purdue HO-238-W);
    // 200 µmol m⁻² s⁻¹ (10 800 lux of sunlight) for 12 h → 8.64.
    const a = dayHours("2025-01-10T00:00:00Z").map((ms, i) =>
      rollup(ms, { t: 20, lux: i >= 7 && i < 17 ? 10_000 : 0 }),
    );
    const b = dayHours("2025-01-11T00:00:00Z").map((ms, i) =>
      rollup(ms, { t: 20, lux: i >= 6 && i < 18 ? 10_800 : 0 }),
    );
    const p = seasonProfile([...a, ...b], london, yearOpts);
    expect(p.days[0].dli).toBeCloseTo(6.67, 2);
    expect(p.days[1].dli).toBeCloseTo(8.64, 9);
    expect(p.months[0].light).toEqual({ meanDli: expect.closeTo((6.6667 + 8.64) / 2, 3), daysWithLight: 2 });
  });

  it("leaves out days with fewer than 20 hours of light samples", () => {
    const rollups = dayHours("2025-01-10T00:00:00Z").map((ms, i) =>
      rollup(ms, { t: 20, lux: i < 19 ? 5_000 : undefined }),
    );
    const p = seasonProfile(rollups, london, yearOpts);
    expect(p.days[0]).toMatchObject({ lightHours: 19, dli: null });
    expect(p.months[0].light).toEqual({ meanDli: null, daysWithLight: 0 });
  });

  // Issue 15: DLI was always computed with the sunlight factor, also on a shelf under LEDs.
  it("uses the spot's light source for DLI: white LED 70 lux per µmol, not sunlight's 54", () => {
    // 10,800 lux for 12 h: 8.64 mol m⁻² d⁻¹ of sunlight (REFERENCES check, Thimijan & Heins 1983);
    // under white LEDs (70 lux per µmol, memory) 10,800 / 70 × 0.0036 × 12 ≈ 6.66.
    const rollups = dayHours("2025-01-11T00:00:00Z").map((ms, i) =>
      rollup(ms, { t: 20, lux: i >= 6 && i < 18 ? 10_800 : 0 }),
    );
    const sun = seasonProfile(rollups, london, yearOpts);
    const led = seasonProfile(rollups, london, { ...yearOpts, lightSource: "led" });
    const tubes = seasonProfile(rollups, london, { ...yearOpts, lightSource: "fluorescent" });
    expect(sun.luxPerPpfd).toBe(54);
    expect(sun.days[0].dli).toBeCloseTo(8.64, 9);
    expect(led.luxPerPpfd).toBe(70);
    expect(led.days[0].dli).toBeCloseTo((10_800 / 70) * 0.0036 * 12, 9);
    expect(led.months[0].light.meanDli).toBeCloseTo(6.665, 3);
    expect(tubes.days[0].dli).toBeCloseTo((10_800 / 74) * 0.0036 * 12, 9);
  });

  it("exposes the mean DLI of every month and month of the year", () => {
    const rollups = [
      ...dayHours("2025-01-11T00:00:00Z").map((ms, i) => rollup(ms, { t: 20, lux: i >= 6 && i < 18 ? 10_800 : 0 })),
      ...dayHours("2025-06-11T00:00:00Z").map((ms, i) => rollup(ms, { t: 20, lux: i >= 6 && i < 18 ? 21_600 : 0 })),
    ];
    const p = seasonProfile(rollups, london, yearOpts);
    expect(p.months[0].light.meanDli).toBeCloseTo(8.64, 9);
    expect(p.year[5].light.meanDli).toBeCloseTo(17.28, 9);
    expect(p.year[2].light.meanDli).toBeNull();
  });

  describe("a light sensor that clips (flat top)", () => {
    // A cheap lux chip saturates at 65,535 counts ÷ 1.2 ≈ 54,612 lux (memory: BH1750-type chips);
    // direct summer sun is about 100 klux (2,000 µmol × 54, Thimijan & Heins 1983). Synthetic days:
    // a half-sine of daylight from 04:00 to 20:00 UTC peaking at `peak` lux, read by a sensor
    // that tops out at `ceiling`; the hour's highest reading and its mean as the writer stores them.
    const CHIP = 65_535 / 1.2;
    function sunDay(day: string, peak: number, ceiling = Infinity, withMax = true): HourlyRollup[] {
      return dayHours(day).map((ms, i) => {
        const samples = [0, 10, 20, 30, 40, 50].map((m) => {
          const x = (i + m / 60 - 4) / 16;
          return x > 0 && x < 1 ? Math.min(ceiling, peak * Math.sin(Math.PI * x)) : 0;
        });
        const r = rollup(ms, { t: 20 });
        return {
          ...r,
          luxN: 6,
          luxSum: samples.reduce((a, b) => a + b, 0),
          luxMax: withMax ? Math.max(...samples) : undefined,
        };
      });
    }
    const june = (n: number, peakOf: (d: number) => number, ceiling?: number, withMax?: boolean) =>
      Array.from({ length: n }, (_, d) =>
        sunDay(`2025-06-${String(d + 1).padStart(2, "0")}T00:00:00Z`, peakOf(d), ceiling, withMax),
      ).flat();

    it("is noticed: many hours at one ceiling near 55 klux, per month and overall", () => {
      // Sunny and dull days alternate: the sunny ones clip, the dull ones (30 klux) do not.
      const rollups = june(20, (d) => (d % 2 === 0 ? 100_000 : 30_000), CHIP);
      const p = seasonProfile(rollups, london, yearOpts);
      expect(p.luxClipped).not.toBeNull();
      expect(p.luxClipped!.ceilingLux).toBeCloseTo(CHIP, 6);
      expect(p.luxClipped!.days).toBe(10);
      expect(p.luxClipped!.hours).toBeGreaterThanOrEqual(50);
      expect(p.months[5].luxClipped).toEqual(p.luxClipped);
      expect(p.year[5].luxClipped).toEqual(p.luxClipped);
      expect(p.months[0].luxClipped).toBeNull();
    });

    it("is noticed from hourly means alone in rollups stored before the maximum was kept", () => {
      const p = seasonProfile(
        june(20, () => 100_000, CHIP, false),
        london,
        yearOpts,
      );
      expect(p.luxClipped?.ceilingLux).toBeCloseTo(CHIP, 6);
    });

    it("is not claimed for daylight that never reaches the chip's ceiling, even on days of the same peak", () => {
      // Clear days with peaks a few per cent apart, and twenty identical clear days: a sloping top.
      expect(
        seasonProfile(
          june(20, (d) => 50_000 + (d % 5) * 400),
          london,
          yearOpts,
        ).luxClipped,
      ).toBeNull();
      expect(
        seasonProfile(
          june(20, () => 50_000),
          london,
          yearOpts,
        ).luxClipped,
      ).toBeNull();
    });

    it("is not looked for under lamps alone, whose steady light is flat by nature", () => {
      const shelf = june(20, () => 0).map((r, i) => {
        const hour = i % 24;
        return hour >= 6 && hour < 18 ? { ...r, luxN: 6, luxSum: 6 * 12_000, luxMax: 12_000 } : r;
      });
      expect(seasonProfile(shelf, london, { ...yearOpts, lightSource: "led" }).luxClipped).toBeNull();
    });
  });

  it("counts condensation hours strictly under a 2 °C dew-point margin", () => {
    const margins = [1.99, 2, 0, null, -0.5, 2.01];
    const rollups = margins.map((dp, i) => rollup(Date.parse("2025-02-01T00:00:00Z") + i * HOUR, { t: 5, dp }));
    expect(seasonProfile(rollups, london, yearOpts).months[1].condensationHours).toBe(3);
  });
});

describe("seasonProfile — percentiles and invariants", () => {
  it("takes percentiles of hourly means by linear interpolation", () => {
    // Hyndman & Fan (1996), "Sample quantiles in statistical packages", Am. Stat. 50, 361–365,
    // definition 7: h = (n − 1)p. 744 hourly means 0…743 → p05 = 37.15, p95 = 705.85.
    const rollups = hoursBetween("2025-01-01T00:00:00Z", "2025-02-01T00:00:00Z").map((ms, i) => rollup(ms, { t: i }));
    const jan = seasonProfile(rollups, london, yearOpts).months[0];
    expect(jan.temperature.p05).toBeCloseTo(37.15, 9);
    expect(jan.temperature.p95).toBeCloseTo(705.85, 9);
  });

  it("keeps every hour in exactly one month, and lowest ≤ p05 ≤ p95 ≤ highest", () => {
    const start = Date.parse("2025-01-01T00:00:00Z");
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.integer({ min: 0, max: 24 * 365 - 1 }), { maxLength: 300 }),
        fc.array(fc.double({ min: -10, max: 40, noNaN: true }), { minLength: 300, maxLength: 300 }),
        (offsets, temps) => {
          const rollups = offsets.map((h, i) => rollup(start + h * HOUR, { t: temps[i] }));
          const p = seasonProfile(rollups, london, yearOpts);
          expect(p.months.reduce((n, m) => n + m.coverage.hoursObserved, 0)).toBe(offsets.length);
          for (const m of p.months) {
            const t = m.temperature;
            if (t.lowest === null) continue;
            // tolerance: the hourly mean is tSum / tN, which can differ from tMin in the last bit
            expect(t.lowest).toBeLessThanOrEqual(t.p05! + 1e-9);
            expect(t.p05!).toBeLessThanOrEqual(t.p95!);
            expect(t.p95!).toBeLessThanOrEqual(t.highest! + 1e-9);
          }
        },
      ),
      { numRuns: 30 },
    );
  });

  it("handles a year of rollups quickly (timing logged, not asserted)", () => {
    const rollups = londonYear();
    const site: Site = { ...london, latitude: 52.2 }; // fresh sun cache for the first run
    const runs = [0, 1, 2].map(() => {
      const t0 = performance.now();
      seasonProfile(rollups, site, yearOpts);
      return (performance.now() - t0).toFixed(1);
    });
    console.log(`seasonProfile: ${rollups.length} rollups in ${runs.join(" / ")} ms (first, then warm)`);
  });
});
