// The accuracy of projected months on the simulator (simulator/projection-accuracy.ts says how it
// is measured). The goals of issue 16 (median absolute error ≤ 1.0 °C for windowsills and benches,
// ≤ 1.5 °C for heated rooms; ~80 % inside the 80 % interval) are reported in the printed table
// (copied into the README); the thresholds asserted here are looser.
import { describe, expect, it } from "vitest";
import { accuracyTable, formatTable } from "../../../simulator/projection-accuracy";

describe("projected months against a simulated year (fit on 14 days, one run per season)", () => {
  it("beats both naive baselines, within loose error and coverage bounds", () => {
    const rows = accuracyTable();
    console.log(
      `Monthly mean daily low and high, median absolute error over months not fitted on:\n${formatTable(rows)}`,
    );
    for (const r of rows) {
      // Loose: the goals (≤ 1.0 / 1.5 °C, ~80 %) are reported in the table, not asserted.
      expect(r.model, r.spot).toBeLessThan(Math.max(r.firstWeeks, 1));
      expect(r.model, r.spot).toBeLessThan(1.5);
      expect(r.coverage, r.spot).toBeGreaterThan(0.4);
    }
  }, 120_000);
});
