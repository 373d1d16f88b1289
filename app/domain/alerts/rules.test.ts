import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { coldFrontScenario, DEMO_SITE, generate } from "../../../simulator/model";
import { evaluate, valueFor, type Point, type RuleSettings, type RuleState } from "./rules";

const MIN = 60_000;
const T0 = Date.UTC(2026, 11, 1, 0, 0);
const cold: RuleSettings = { kind: "cold", threshold: 10, durationMinutes: 10, hysteresis: 1, clearMinutes: 30 };
const empty: RuleState = { pendingSince: null, clearingSince: null, open: null };
const series = (values: number[], stepMin = 1, from = T0): Point[] =>
  values.map((value, i) => ({ at: new Date(from + i * stepMin * MIN), value }));

describe("evaluate", () => {
  it("opens only after the condition held for the duration, starting when it began", () => {
    const pts = series([12, 11, 9.8, 9.6, 9.5, 9.4, 9.3, 9.2, 9.1, 9, 8.9, 8.8, 8.7]);
    const { state, transitions } = evaluate(cold, empty, pts);
    expect(transitions).toHaveLength(1);
    expect(transitions[0]).toMatchObject({
      type: "open",
      startedAt: new Date(T0 + 2 * MIN),
      at: new Date(T0 + 12 * MIN),
      peak: 8.7,
    });
    expect(state.open?.peak).toBe(8.7);
  });

  it("does not open on a dip shorter than the duration", () => {
    const { transitions, state } = evaluate(
      cold,
      empty,
      series([12, 9.5, 9.5, 9.5, 12, 12, 12, 12, 12, 12, 12, 12, 12]),
    );
    expect(transitions).toEqual([]);
    expect(state.pendingSince).toBeNull();
  });

  it("gives the all-clear only after the value stayed back past the hysteresis for clearMinutes", () => {
    const opened = evaluate(cold, empty, series(Array(12).fill(8))).state;
    // 10.5 is above the threshold but inside the 1 °C band: not yet "back".
    const hovering = evaluate(cold, opened, series(Array(60).fill(10.5), 1, T0 + 20 * MIN));
    expect(hovering.transitions).toEqual([]);
    const back = evaluate(cold, hovering.state, series(Array(31).fill(11.2), 1, T0 + 80 * MIN));
    expect(back.transitions).toEqual([{ type: "clear", at: new Date(T0 + 110 * MIN), peak: 8 }]);
    expect(back.state.open).toBeNull();
  });

  it("a value oscillating around the threshold opens one event and never flaps it", () => {
    const wobble = Array.from({ length: 600 }, (_, i) => 10 + (i % 2 === 0 ? 0.4 : -0.4));
    const { transitions } = evaluate(cold, empty, series(wobble));
    expect(transitions.map((t) => t.type)).toEqual(["open"]);
  });

  it("property: however readings are split into batches, the transitions are the same", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 5, max: 15, noNaN: true }), { minLength: 1, maxLength: 200 }),
        fc.integer({ min: 1, max: 50 }),
        (values, cut) => {
          const pts = series(values);
          const whole = evaluate(cold, empty, pts).transitions;
          const first = evaluate(cold, empty, pts.slice(0, cut));
          const second = evaluate(cold, first.state, pts.slice(cut));
          expect([...first.transitions, ...second.transitions]).toEqual(whole);
        },
      ),
    );
  });

  it("property: events alternate open/clear and a clear is never within clearMinutes of its open", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 5, max: 15, noNaN: true }), { maxLength: 300 }), (values) => {
        const { transitions } = evaluate(cold, empty, series(values));
        transitions.forEach((t, i) => expect(t.type).toBe(i % 2 === 0 ? "open" : "clear"));
        for (let i = 1; i < transitions.length; i += 2) {
          expect(transitions[i].at.getTime() - transitions[i - 1].at.getTime()).toBeGreaterThanOrEqual(
            cold.clearMinutes * MIN,
          );
        }
      }),
    );
  });

  it("a late reading cannot reopen a cleared event or start one inside it", () => {
    const opened = evaluate(cold, empty, series([...Array(12).fill(8), ...Array(31).fill(12)]));
    expect(opened.transitions.map((t) => t.type)).toEqual(["open", "clear"]);
    // A second sensor's readings from the middle of that event turn up after the all-clear.
    const late = evaluate(cold, opened.state, series(Array(15).fill(7), 1, T0 + 5 * MIN));
    expect(late.transitions).toEqual([]);
    expect(late.state).toEqual(opened.state);
  });

  it("a late reading inside an open event can still lower its peak, and advances nothing", () => {
    const opened = evaluate(cold, empty, series(Array(12).fill(8)));
    const late = evaluate(cold, opened.state, [
      { at: new Date(T0 + 5 * MIN), value: 6.5 },
      { at: new Date(T0 - 5 * MIN), value: 2 }, // before the event began: not part of it
    ]);
    expect(late.state.open?.peak).toBe(6.5);
    expect(late.state.cursor).toEqual(opened.state.cursor);
    expect(late.transitions).toEqual([]);
  });

  it("property: in any arrival order and batching, one rule's events never overlap", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 5, max: 15, noNaN: true }), { minLength: 1, maxLength: 200 }),
        fc.array(fc.integer({ min: 0, max: 199 })),
        fc.integer({ min: 1, max: 20 }),
        (values, swaps, batch) => {
          const pts = series(values);
          for (let i = 0; i + 1 < swaps.length; i += 2) {
            const a = swaps[i] % pts.length;
            const b = swaps[i + 1] % pts.length;
            [pts[a], pts[b]] = [pts[b], pts[a]];
          }
          let state = empty;
          const transitions = [];
          for (let i = 0; i < pts.length; i += batch) {
            const r = evaluate(cold, state, pts.slice(i, i + batch));
            state = r.state;
            transitions.push(...r.transitions);
          }
          const spans: [number, number][] = [];
          let start: number | null = null;
          for (const t of transitions) {
            if (t.type === "open") {
              expect(start).toBeNull();
              start = t.startedAt.getTime();
            } else {
              expect(start).not.toBeNull();
              spans.push([start!, t.at.getTime()]);
              start = null;
            }
          }
          if (start != null) spans.push([start, Infinity]);
          for (let i = 1; i < spans.length; i++) expect(spans[i][0]).toBeGreaterThanOrEqual(spans[i - 1][1]);
        },
      ),
    );
  });

  it("heat opens above the threshold", () => {
    const heat: RuleSettings = { kind: "heat", threshold: 30, durationMinutes: 5, hysteresis: 1, clearMinutes: 10 };
    const { transitions } = evaluate(heat, empty, series([29, 31, 32, 33, 32, 31, 31]));
    expect(transitions[0]).toMatchObject({ type: "open", peak: 33 });
  });

  it("a simulated cold front opens one event with the front's minimum and clears once after it", () => {
    const start = new Date(T0 + 2 * 3_600_000);
    const readings = [
      ...generate(DEMO_SITE, { kind: "outdoor", facing: "none", hasLight: true }, coldFrontScenario(start), {
        from: new Date(T0),
        to: new Date(T0 + 14 * 3_600_000),
        intervalMs: 5 * MIN,
        sensorSeed: 101,
      }),
    ];
    const pts = readings.map((r) => ({ at: r.measuredAt, value: r.temperature }));
    const { transitions } = evaluate(cold, empty, pts);
    expect(transitions.map((t) => t.type)).toEqual(["open", "clear"]);
    expect(transitions[1].peak).toBe(Math.min(...pts.map((p) => p.value)));
  });
});

describe("valueFor", () => {
  it("condensation watches the dew-point margin", () => {
    // 20 °C at 100 % RH sits at its dew point (by definition of the dew point).
    expect(valueFor("condensation", { t: 20, h: 100, battery: null })).toBeCloseTo(0, 6);
    // 20 °C, 50 % RH: dew point 9.3 °C (psychrometric tables, e.g. ASHRAE Fundamentals), margin about 10.7 K.
    expect(valueFor("condensation", { t: 20, h: 50, battery: null })).toBeCloseTo(10.7, 0);
    expect(valueFor("cold", { t: null, h: 50, battery: 80 })).toBeNull();
  });
});
