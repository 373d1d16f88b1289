import { describe, expect, it } from "vitest";
import { decodeStrip, encodeStrip, monthStrip, stripLabel } from "~/domain/fit/month-strip";
import type { CheckResult } from "~/domain/fit/facts";

const all = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12];

// Scenarios: a cold bench in a northern winter (nights under a warm grower's 16 °C comfort line Dec–Feb,
// common practice for Phalaenopsis) and a spot measured for part of the year with the rest projected.
describe("a fit reason's month strip (issue 17)", () => {
  it("fails the months a poor cold-nights rule names, passes the measured rest, wrapping Dec–Feb in the label", () => {
    const r: CheckResult = {
      rule: "cold-nights",
      level: "poor",
      months: ["12", "01", "02"],
      facts: [
        {
          kind: "cold-season",
          comfortC: 16,
          damageC: 12,
          nights: 60,
          months: [12, 1, 2],
          typicalLowC: 11,
          degreeHours: 900,
        },
      ],
    };
    const cells = monthStrip(r, { measured: all })!;
    expect(encodeStrip(cells)).toBe("ffpppppppppf");
    expect(stripLabel("cold-nights", cells)).toBe("Cold nights: fails in Dec, Jan, Feb; passes in Mar–Nov");
  });

  it("marks a damaging episode as a fail even when the rule as a whole asks for care, and unread months as not measured", () => {
    const r: CheckResult = {
      rule: "cold-nights",
      level: "care",
      months: ["11", "01"],
      facts: [
        { kind: "cold-snap", comfortC: 16, damageC: 12, nights: 3, worst: [], degreeHours: 20 },
        {
          kind: "cold-damage",
          damageC: 12,
          nights: 1,
          worst: [{ date: "2026-01-10", valueC: 10, hours: 2 }],
          degreeHours: 4,
        },
      ],
    };
    // cold-damage carries no month list: the rule's months take its level (care).
    const cells = monthStrip(r, { measured: [9, 10, 11, 12, 1] })!;
    expect(encodeStrip(cells)).toBe("cuuuuuuuppcp");
    expect(stripLabel("cold-nights", cells)).toBe(
      "Cold nights: asks for care in Jan, Nov; passes in Sep, Oct, Dec; not measured in Feb–Aug",
    );
  });

  it("marks projected months as projected: a likely warning from the projection, passes filled in", () => {
    const r: CheckResult = {
      rule: "hot-days",
      level: "care",
      likely: "poor",
      confidence: "mixed",
      months: ["07"],
      facts: [
        {
          kind: "projected-heat",
          line: "damage",
          lineC: 34,
          months: [7],
          worstMonth: 7,
          highC: 36,
          rangeC: [33, 38],
          years: 10,
        },
      ],
    };
    const cells = monthStrip(r, { measured: [1, 2, 3], projected: [4, 5, 6, 7, 8, 9, 10, 11, 12] })!;
    expect(encodeStrip(cells)).toBe("pppPPPCPPPPP");
    expect(stripLabel("hot-days", cells)).toBe(
      "Hot days: likely asks for care in Jul (projected); passes in Jan, Feb, Mar; likely passes in Apr, May, Jun, Aug–Dec (projected)",
    );
  });

  it("light counts the months the light sensor read; flowering, no data and month-less reasons get no strip", () => {
    const light: CheckResult = {
      rule: "light",
      level: "care",
      months: ["12"],
      facts: [
        {
          kind: "light-months",
          minDli: 6,
          maxDli: 12,
          months: [
            { month: 11, dli: 5 },
            { month: 12, dli: 3 },
          ],
          dim: [12],
          bright: [],
          scorch: [],
          unmeasured: [1, 2],
        },
      ],
    };
    expect(encodeStrip(monthStrip(light, { measured: all })!)).toBe("uuuuuuuuuupc");
    expect(
      monthStrip({ rule: "flowering", level: "care", facts: [{ kind: "cue-none" }] }, { measured: all }),
    ).toBeNull();
    expect(monthStrip({ rule: "light", level: "unknown", noData: true, facts: [] }, { measured: all })).toBeNull();
    expect(
      monthStrip(
        {
          rule: "light",
          level: "care",
          facts: [
            { kind: "light-window", facing: "N", sunnyMonths: 0, strongSunMonths: [], need: "high", verdict: "shade" },
          ],
        },
        { measured: all },
      ),
    ).toBeNull();
  });

  it("round-trips through its twelve-letter code", () => {
    const cells = monthStrip(
      { rule: "humidity", level: "care", months: ["06"], facts: [] },
      { measured: all, projected: [] },
    )!;
    expect(decodeStrip(encodeStrip(cells))).toEqual(cells);
  });
});
