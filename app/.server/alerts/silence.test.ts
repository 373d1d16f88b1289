import { describe, expect, it } from "vitest";
import { silentMinutes, talking } from "./silence";

const MIN = 60_000;
const T0 = new Date(Date.UTC(2026, 11, 1, 18, 0));
const at = (minutes: number) => new Date(T0.getTime() + minutes * MIN);

describe("silence rules", () => {
  it("a spot is silent once quiet for the watch's minutes, and says for how long", () => {
    expect(silentMinutes(60, T0, at(59))).toBeNull();
    expect(silentMinutes(60, T0, at(60))).toBe(60);
    expect(silentMinutes(60, T0, at(95))).toBe(95);
  });

  it("only a reading within the watch's minutes of the clock ends a silence", () => {
    expect(talking(60, [at(10)], at(90))).toBe(false);
    expect(talking(60, [at(10), at(31)], at(90))).toBe(true);
    expect(talking(60, [], at(90))).toBe(false);
  });
});
