import { describe, expect, it } from "vitest";
import { FROM_FIRST_READING, gapsBetween, isFromFirstReading } from "~/lib/placements";

const d = (s: string) => new Date(`2026-0${s}T00:00:00Z`);

describe("stretches outside every placement", () => {
  it("finds the time before the first placement, between placements and after the last", () => {
    expect(gapsBetween([])).toEqual([{ from: null, to: null }]);
    expect(gapsBetween([{ fromAt: d("3-01"), toAt: null }])).toEqual([{ from: null, to: d("3-01") }]);
    expect(
      gapsBetween([
        { fromAt: d("3-01"), toAt: d("4-01") },
        { fromAt: d("4-01"), toAt: d("5-01") }, // moved straight on: no gap
        { fromAt: d("6-01"), toAt: d("7-01") },
      ]),
    ).toEqual([
      { from: null, to: d("3-01") },
      { from: d("5-01"), to: d("6-01") },
      { from: d("7-01"), to: null },
    ]);
  });

  it("a placement from the first reading leaves nothing before it", () => {
    expect(gapsBetween([{ fromAt: FROM_FIRST_READING, toAt: null }])).toEqual([]);
    expect(isFromFirstReading(FROM_FIRST_READING.toISOString())).toBe(true);
    expect(isFromFirstReading(d("3-01"))).toBe(false);
  });
});
