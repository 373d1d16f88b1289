import { describe, it, expect } from "vitest";
import fc from "fast-check";
import {
  PH_MAX,
  PH_MIN,
  ROUTINE_WATERING_MAX_EC,
  TDS_SCALE_442,
  TDS_SCALE_NACL,
  UNBUFFERED_MAX_EC,
  ecToPpm,
  ppmToEc,
  routineLimitPpm,
  waterVerdict,
} from "~/domain/water/verdict";

// All thresholds and scales here are growers' rules of thumb (common practice, shared/REFERENCES.md):
// "over 100 ppm TDS is not for routine watering of orchids", stated here as 200 µS/cm (100 ppm on
// the NaCl scale); irrigation pH 5.5–6.5, judged only in water with buffer (over 100 µS/cm);
// ppm ≈ µS/cm × 0.5 (NaCl scale) or × 0.7 (442 scale).

describe("thresholds (common practice)", () => {
  it("are 200 µS/cm (100 ppm on 0.5, 140 ppm on 0.7), buffer over 100 µS/cm, and pH 5.5–6.5", () => {
    expect(ROUTINE_WATERING_MAX_EC).toBe(200);
    expect(routineLimitPpm(TDS_SCALE_NACL)).toBe(100);
    expect(routineLimitPpm(TDS_SCALE_442)).toBe(140);
    expect(UNBUFFERED_MAX_EC).toBe(100);
    expect(PH_MIN).toBe(5.5);
    expect(PH_MAX).toBe(6.5);
  });
});

describe("ecToPpm (common practice scales)", () => {
  it("reads 200 µS/cm as 100 ppm on the NaCl scale and 140 ppm on the 442 scale", () => {
    expect(ecToPpm(200, TDS_SCALE_NACL)).toBe(100);
    expect(ecToPpm(200, TDS_SCALE_442)).toBeCloseTo(140, 9);
    expect(ppmToEc(140, TDS_SCALE_442)).toBeCloseTo(200, 9);
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
  it("calls typical filtered water with buffer good", () => {
    const result = waterVerdict({ ec: 150, ppm: null, ph: 6.0 });
    expect(result.verdict).toBe("good");
    expect(result.buffered).toBe(true);
    expect(result.reasons).toHaveLength(2);
  });

  // Issue 15: rain at 10 ppm and pH 5.2 was told it "needs adjusting". Rain has almost no buffer:
  // its pH drifts and means little (common practice).
  it("does not judge the pH of rain at 10 ppm and pH 5.2: good, with the reason", () => {
    for (const scale of [null, TDS_SCALE_NACL, TDS_SCALE_442]) {
      const rain = waterVerdict({ ppm: 10, scale, ph: 5.2 });
      expect(rain.verdict).toBe("good");
      expect(rain.buffered).toBe(false);
      expect(rain.reasons[1]).toMatch(/not judged.*no buffer/);
    }
    // RO water at 15 µS/cm and pH 8.4, the same (common practice).
    expect(waterVerdict({ ec: 15, ppm: null, ph: 8.4 }).verdict).toBe("good");
    // Without a pH at all, water without buffer is still good.
    expect(waterVerdict({ ec: 15, ppm: null, ph: null }).verdict).toBe("good");
  });

  it("still judges pH where the water has buffer", () => {
    expect(waterVerdict({ ec: 150, ppm: null, ph: 5.2 }).verdict).toBe("adjust");
    expect(waterVerdict({ ec: 150, ppm: null, ph: 7.6 }).reasons[1]).toMatch(/alkaline/);
    expect(waterVerdict({ ec: UNBUFFERED_MAX_EC, ppm: null, ph: 5.2 }).buffered).toBe(false);
    expect(waterVerdict({ ec: UNBUFFERED_MAX_EC + 1, ppm: null, ph: 5.2 }).verdict).toBe("adjust");
  });

  it("judges pH, with a hint, when no TDS or EC tells the buffer", () => {
    const r = waterVerdict({ ppm: null, ph: 5.2 });
    expect(r.verdict).toBe("adjust");
    expect(r.buffered).toBeNull();
    expect(r.reasons[1]).toMatch(/rain or RO water/);
  });

  // Issue 15: 200 µS/cm was fine on a 0.5 meter and not on a 0.7 one. The rule is in µS/cm now.
  it("gives 200 µS/cm the same verdict whatever the meter's scale", () => {
    expect(waterVerdict({ ec: 200, ppm: null, ph: 6 }).verdict).toBe("good");
    expect(waterVerdict({ ppm: 100, scale: 0.5, ph: 6 }).verdict).toBe("good");
    expect(waterVerdict({ ppm: 140, scale: 0.7, ph: 6 }).verdict).toBe("good");
    expect(waterVerdict({ ec: 201, ppm: null, ph: 6 }).verdict).toBe("avoid");
    expect(waterVerdict({ ppm: 101, scale: 0.5, ph: 6 }).verdict).toBe("avoid");
    expect(waterVerdict({ ppm: 141, scale: 0.7, ph: 6 }).verdict).toBe("avoid");
  });

  it("treats a TDS reading of unknown scale by what it can be: under 100 ppm good, over 140 ppm avoid, between ask for the scale", () => {
    expect(waterVerdict({ ppm: 100, ph: 6 }).verdict).toBe("good");
    expect(waterVerdict({ ppm: 141, ph: 6 }).verdict).toBe("avoid");
    const between = waterVerdict({ ppm: 120, ph: 6 });
    expect(between.verdict).toBe("adjust");
    expect(between.reasons[0]).toMatch(/meter's scale/);
    expect(between.ecLow).toBeCloseTo(120 / 0.7, 9);
    expect(between.ecHigh).toBe(240);
  });

  it("names the limit in µS/cm and in both ppm scales", () => {
    expect(waterVerdict({ ppm: 280, scale: 0.5, ph: 7.5 }).reasons[0]).toMatch(
      /^280 ppm on a 0.5 meter \(560 µS\/cm\) is over 200 µS\/cm \(100 ppm on a 0.5 meter, 140 ppm on a 0.7 meter\)/,
    );
  });

  it("lets too much dissolved mineral outrank a pH problem, and reports both", () => {
    const result = waterVerdict({ ppm: 320, ph: 7.8 });
    expect(result.verdict).toBe("avoid");
    expect(result.reasons).toHaveLength(2);
    expect(result.reasons[1]).toMatch(/alkaline/);
  });

  it("does not call water with buffer good while a value is missing", () => {
    expect(waterVerdict({ ppm: 80, ph: null }).verdict).toBe("adjust");
    expect(waterVerdict({ ppm: null, ph: 6 }).verdict).toBe("adjust");
    expect(waterVerdict({ ppm: 180, ph: null }).verdict).toBe("avoid");
  });

  it("rejects readings no meter gives", () => {
    expect(() => waterVerdict({ ppm: -3, ph: 6 })).toThrow(RangeError);
    expect(() => waterVerdict({ ec: -1, ppm: null, ph: 6 })).toThrow(RangeError);
    expect(() => waterVerdict({ ppm: 50, ph: 15 })).toThrow(RangeError);
    expect(() => waterVerdict({ ppm: Number.NaN, ph: 6 })).toThrow(RangeError);
  });

  it("is good exactly when EC ≤ 200 µS/cm and either EC ≤ 100 or 5.5 ≤ pH ≤ 6.5", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1000, noNaN: true }),
        fc.double({ min: 0, max: 14, noNaN: true }),
        (ec, ph) => {
          const good = ec <= 200 && (ec <= 100 || (ph >= 5.5 && ph <= 6.5));
          return (waterVerdict({ ec, ppm: null, ph }).verdict === "good") === good;
        },
      ),
    );
  });
});
