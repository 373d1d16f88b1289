import { describe, it, expect } from "vitest";
import fc from "fast-check";
import {
  PH_MAX,
  PH_MIN,
  ROUTINE_WATERING_MAX_PPM,
  TDS_SCALE_442,
  TDS_SCALE_NACL,
  ecToPpm,
  waterVerdict,
} from "~/domain/water/water";

// All thresholds and scales here are growers' rules of thumb (common practice, shared/REFERENCES.md):
// over 100 ppm TDS is not for routine watering of orchids; irrigation pH 5.5–6.5;
// ppm ≈ µS/cm × 0.5 (NaCl scale) or × 0.7 (442 scale).

describe("thresholds (common practice)", () => {
  it("are 100 ppm and pH 5.5–6.5", () => {
    expect(ROUTINE_WATERING_MAX_PPM).toBe(100);
    expect(PH_MIN).toBe(5.5);
    expect(PH_MAX).toBe(6.5);
  });
});

describe("ecToPpm (common practice scales)", () => {
  it("reads 200 µS/cm as 100 ppm on the NaCl scale and 140 ppm on the 442 scale", () => {
    expect(ecToPpm(200, TDS_SCALE_NACL)).toBe(100);
    expect(ecToPpm(200, TDS_SCALE_442)).toBeCloseTo(140, 9);
  });

  it("puts the 100 ppm line at 200 µS/cm (NaCl) or about 143 µS/cm (442)", () => {
    expect(ecToPpm(200, 0.5)).toBe(ROUTINE_WATERING_MAX_PPM);
    expect(ecToPpm(100 / 0.7, 0.7)).toBeCloseTo(ROUTINE_WATERING_MAX_PPM, 9);
  });

  it("always reads higher on the 442 scale than on the NaCl scale, by 0.7/0.5", () => {
    fc.assert(
      fc.property(fc.double({ min: 1, max: 5000, noNaN: true }), (ec) => {
        return Math.abs(ecToPpm(ec, 0.7) / ecToPpm(ec, 0.5) - 1.4) < 1e-12;
      }),
    );
  });
});

describe("waterVerdict", () => {
  it("calls typical rain or filtered water good", () => {
    const result = waterVerdict({ ppm: 12, ph: 6.0 });
    expect(result.verdict).toBe("good");
    expect(result.reasons).toHaveLength(2);
  });

  it("treats exactly 100 ppm as within the rule, and just over as not", () => {
    expect(waterVerdict({ ppm: 100, ph: 6 }).verdict).toBe("good");
    expect(waterVerdict({ ppm: 100.5, ph: 6 }).verdict).toBe("avoid");
    expect(waterVerdict({ ppm: 101, ph: 6 }).reasons[0]).toMatch(/over 100 ppm/);
    expect(waterVerdict({ ppm: 100.4, ph: 6 }).reasons[0]).toMatch(/^100.4 ppm is over/);
  });

  it("treats pH 5.5 and 6.5 as in range and just past them as needing attention", () => {
    expect(waterVerdict({ ppm: 50, ph: 5.5 }).verdict).toBe("good");
    expect(waterVerdict({ ppm: 50, ph: 6.5 }).verdict).toBe("good");
    const acid = waterVerdict({ ppm: 50, ph: 5.4 });
    expect(acid.verdict).toBe("adjust");
    expect(acid.reasons[1]).toMatch(/acidic/);
    const alkaline = waterVerdict({ ppm: 50, ph: 6.6 });
    expect(alkaline.verdict).toBe("adjust");
    expect(alkaline.reasons[1]).toMatch(/alkaline/);
  });

  it("lets too much dissolved mineral outrank a pH problem, and reports both", () => {
    const result = waterVerdict({ ppm: 320, ph: 7.8 });
    expect(result.verdict).toBe("avoid");
    expect(result.reasons).toHaveLength(2);
    expect(result.reasons[1]).toMatch(/alkaline/);
  });

  it("does not call water good while a value is missing", () => {
    expect(waterVerdict({ ppm: 40, ph: null }).verdict).toBe("adjust");
    expect(waterVerdict({ ppm: null, ph: 6 }).verdict).toBe("adjust");
    expect(waterVerdict({ ppm: 180, ph: null }).verdict).toBe("avoid");
  });

  it("rejects readings no meter gives", () => {
    expect(() => waterVerdict({ ppm: -3, ph: 6 })).toThrow(RangeError);
    expect(() => waterVerdict({ ppm: 50, ph: 15 })).toThrow(RangeError);
    expect(() => waterVerdict({ ppm: Number.NaN, ph: 6 })).toThrow(RangeError);
  });

  it("is good exactly when ppm ≤ 100 and 5.5 ≤ pH ≤ 6.5", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1000, noNaN: true }),
        fc.double({ min: 0, max: 14, noNaN: true }),
        (ppm, ph) => {
          const good = ppm <= 100 && ph >= 5.5 && ph <= 6.5;
          return (waterVerdict({ ppm, ph }).verdict === "good") === good;
        },
      ),
    );
  });
});
