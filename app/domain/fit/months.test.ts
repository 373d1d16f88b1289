import { describe, expect, it } from "vitest";
import { describeMonths } from "~/domain/fit/describe";

// Issue 17: month ranges that wrap the year read "between September and July", which reads as the
// two months apart. English usage (common practice): "from September to July" names the run's ends.
describe("month ranges that wrap the year", () => {
  it("read from the first month to the last, across the new year", () => {
    expect(describeMonths([9, 10, 11, 12, 1, 2, 3, 4, 5, 6, 7])).toBe("from September to July");
    expect(describeMonths([7, 8, 9, 10, 11, 12, 1, 2, 3, 4])).toBe("from July to April");
    expect(describeMonths([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12])).toBe("all year");
  });
  it("never say 'between'", () => {
    for (let start = 1; start <= 12; start++) {
      const run = Array.from({ length: 7 }, (_, i) => ((start + i - 1) % 12) + 1);
      expect(describeMonths(run)).not.toMatch(/between/);
    }
  });
});
