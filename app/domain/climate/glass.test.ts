import { describe, expect, it } from "vitest";
import { GLAZING_U, paneDewMarginC, paneInsideC, R_SI } from "~/domain/climate/glass";

// T_si = T_in − U·R_si·(T_in − T_out), R_si = 0.13 m²K/W (ISO 6946:2017, Table 7); checks from REFERENCES.md.
describe("cold glass", () => {
  it("puts an old double-glazed pane at ~12.7 °C and single glazing at ~4.9 °C with 20 °C in and 0 °C out", () => {
    expect(R_SI).toBe(0.13);
    expect(paneInsideC(20, 0, 2.8)).toBeCloseTo(12.72, 2);
    expect(paneInsideC(20, 0, GLAZING_U.single)).toBeCloseTo(4.92, 2);
  });

  it("at 20 °C and 60 % inside (dew point ~12 °C), old double glazing sits ~0.7 K above the dew point and single glazing ~7 K under", () => {
    expect(paneDewMarginC(20, 60, 0, 2.8)).toBeCloseTo(0.7, 0);
    expect(paneDewMarginC(20, 60, 0, 5.8)).toBeCloseTo(-7.1, 0);
    expect(paneDewMarginC(20, 60, 0, GLAZING_U.triple)).toBeGreaterThan(6);
  });
});
