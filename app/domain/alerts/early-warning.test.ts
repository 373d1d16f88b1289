import { describe, expect, it } from "vitest";
import { coldFrontScenario, DEMO_SITE, generate } from "../../../simulator/model";
import { projectBatch, projectCrossing, roundMinutes } from "./early-warning";
import type { Point } from "./rules";

const MIN = 60_000;
const HOUR = 3_600_000;
const T0 = Date.UTC(2026, 11, 1, 18, 0);
const OUTDOOR = { kind: "outdoor", facing: "none", hasLight: true } as const;

/** The first instant the projection fires when points arrive one by one, and the first crossing. */
function replay(points: Point[], threshold: number) {
  let warnedAt: number | null = null;
  let crossedAt: number | null = null;
  for (let i = 1; i <= points.length; i++) {
    const p = points[i - 1];
    if (crossedAt === null && p.value < threshold) crossedAt = p.at.getTime();
    if (warnedAt === null && crossedAt === null && projectCrossing("cold", threshold, points.slice(0, i)))
      warnedAt = p.at.getTime();
  }
  return { warnedAt, crossedAt };
}

const front = (seed: number, intervalMin = 5) => {
  const start = new Date(T0 + 2 * HOUR);
  return [
    ...generate(DEMO_SITE, OUTDOOR, coldFrontScenario(start), {
      from: new Date(T0),
      to: new Date(T0 + 12 * HOUR),
      intervalMs: intervalMin * MIN,
      sensorSeed: seed,
    }),
  ].map((r) => ({ at: r.measuredAt, value: r.temperature }));
};

describe("projectCrossing", () => {
  it("on a steady fall of 3 °C an hour, says 8 °C is 40 minutes away from 10 °C", () => {
    const pts = Array.from({ length: 13 }, (_, i) => ({
      at: new Date(T0 + i * 5 * MIN),
      value: 13 - (3 * i * 5) / 60,
    }));
    const p = projectCrossing("cold", 8, pts)!;
    expect(p.fittedNow).toBeCloseTo(10, 6);
    expect(p.minutes).toBeCloseTo(40, 6);
    expect(p.ratePerHour).toBeCloseTo(-3, 6);
    expect(roundMinutes(p.minutes)).toBe("about 40 minutes");
  });

  it("warns before the crossing of a simulated front, with at least 15 minutes' lead, for several sensors", () => {
    for (const seed of [101, 102, 103, 104, 105]) {
      const { warnedAt, crossedAt } = replay(front(seed), 10);
      expect(crossedAt, `seed ${seed}`).not.toBeNull();
      expect(warnedAt, `seed ${seed}`).not.toBeNull();
      expect(crossedAt! - warnedAt!, `seed ${seed}`).toBeGreaterThanOrEqual(15 * MIN);
    }
  });

  it("does not warn on sensor noise around a steady value just above the threshold", () => {
    // Deterministic noise of ±0.5 °C, more than the ±0.2 °C of the simulated sensor.
    let s = 7;
    const rand = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
    const pts = Array.from({ length: 24 * 60 }, (_, i) => ({ at: new Date(T0 + i * MIN), value: 10.6 + 0.5 * rand() }));
    expect(replay(pts, 10).warnedAt).toBeNull();
  });

  it("does not warn through a whole simulated day without a front", () => {
    const quiet = { ...coldFrontScenario(new Date(T0)), coldFront: undefined };
    const pts = [
      ...generate(DEMO_SITE, OUTDOOR, quiet, {
        from: new Date(T0),
        to: new Date(T0 + 48 * HOUR),
        intervalMs: 5 * MIN,
        sensorSeed: 101,
      }),
    ].map((r) => ({ at: r.measuredAt, value: r.temperature }));
    expect(replay(pts, 10).warnedAt).toBeNull();
  });

  it("says nothing once the spot is already below the line, or with too little history", () => {
    const pts = Array.from({ length: 13 }, (_, i) => ({ at: new Date(T0 + i * 5 * MIN), value: 9 - i * 0.25 }));
    expect(projectCrossing("cold", 10, pts)).toBeNull();
    expect(projectCrossing("cold", 8, pts.slice(0, 3))).toBeNull();
  });

  it("scales with the rule minute for the compressed demo front", () => {
    const pts = Array.from({ length: 13 }, (_, i) => ({
      at: new Date(T0 + i * 5 * 1000),
      value: 13 - (3 * i * 5) / 60,
    }));
    expect(projectCrossing("cold", 8, pts, 1000)?.minutes).toBeCloseTo(40, 6);
  });

  // The cases of issue 16: a sensor read every 15 or 20 minutes saw fewer than the 6 readings an
  // hour the old fit wanted, and a clear night's 0.7 °C/h drift was under its 1 °C/h floor.
  const noisy = (seed: number) => {
    let s = seed;
    return () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648) * 2 - 1;
  };
  const line = (everyMin: number, hours: number, start: number, ratePerHour: number, seed = 3) => {
    const rand = noisy(seed);
    return Array.from({ length: Math.floor((hours * 60) / everyMin) + 1 }, (_, i) => ({
      at: new Date(T0 + i * everyMin * MIN),
      value: Math.round((start + (ratePerHour * i * everyMin) / 60 + 0.15 * rand()) * 10) / 10,
    }));
  };

  for (const everyMin of [15, 20]) {
    it(`warns on a 2 °C/h fall read every ${everyMin} minutes, before the line is crossed`, () => {
      const { warnedAt, crossedAt } = replay(line(everyMin, 6, 14, -2), 8);
      expect(crossedAt).not.toBeNull();
      expect(warnedAt).not.toBeNull();
      expect(crossedAt! - warnedAt!).toBeGreaterThanOrEqual(15 * MIN);
    });
  }

  it("warns on a clear night's slow, steady 0.7 °C/h drift toward the line, an hour or more ahead", () => {
    for (const everyMin of [1, 5, 20]) {
      const { warnedAt, crossedAt } = replay(line(everyMin, 10, 8, -0.7), 3);
      expect(crossedAt, `every ${everyMin} min`).not.toBeNull();
      expect(warnedAt, `every ${everyMin} min`).not.toBeNull();
      expect(crossedAt! - warnedAt!, `every ${everyMin} min`).toBeGreaterThanOrEqual(60 * MIN);
    }
  });

  it("a slow drift that levels off above the line never warns", () => {
    // 0.7 °C/h for 3 hours, then flat 2 °C above the line: the crossing was always more than two
    // hours away on the drifting line, and the flat line points nowhere.
    const pts = line(5, 12, 7.1, -0.7).map((p, i) => ({ ...p, value: Math.max(p.value, 5 + (i % 2) * 0.1) }));
    expect(replay(pts, 3).warnedAt).toBeNull();
  });

  it("says the time in hours past an hour and a half", () => {
    expect(roundMinutes(110)).toBe("about 2 hours");
    expect(roundMinutes(95)).toBe("about 1.5 hours");
  });
});

describe("projectBatch", () => {
  const fall = (from: number, n: number) =>
    Array.from({ length: n }, (_, i) => ({ at: new Date(from + i * 5 * MIN), value: 13 - (3 * i * 5) / 60 }));

  it("counts the crossing from the batch's last reading, however the readings were batched", () => {
    const pts = fall(T0, 13); // 13 °C falling 3 °C an hour: 10 °C after an hour
    const oneByOne = projectCrossing("cold", 8, pts)!;
    const batched = projectBatch("cold", 8, pts, pts.slice(-4))!;
    expect(batched.minutes).toBeCloseTo(oneByOne.minutes, 6);
    expect(batched.minutes).toBeCloseTo(40, 0);
  });

  it("gives nothing once the latest reading is past the line: that is the alert's business", () => {
    const pts = fall(T0, 25); // down to 7 °C
    expect(projectBatch("cold", 8, pts, pts.slice(-3))).toBeNull();
    expect(projectBatch("cold", 8, pts, [])).toBeNull();
  });
});
