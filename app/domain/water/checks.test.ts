import { describe, it, expect } from "vitest";
import { checkPpm, parseSource, ppmLabel, sourceName } from "~/domain/water/checks";
import { waterVerdict } from "~/domain/water/water";

// Meter scales are common practice: ppm ≈ µS/cm × 0.5 on the NaCl scale, × 0.7 on the 442 scale
// (shared/REFERENCES.md; the meter's manual says which).

describe("checkPpm", () => {
  it("keeps a TDS reading as measured", () => {
    expect(checkPpm({ ppm: 280, ec: null, ecScale: null, ph: 7.4 })).toBe(280);
  });

  it("converts EC on the NaCl scale (× 0.5)", () => {
    expect(checkPpm({ ppm: null, ec: 560, ecScale: 0.5, ph: null })).toBe(280);
  });

  it("converts EC on the 442 scale (× 0.7)", () => {
    expect(checkPpm({ ppm: null, ec: 400, ecScale: 0.7, ph: null })).toBeCloseTo(280, 9);
  });

  it("gives no figure for EC without a known scale, or nothing measured", () => {
    expect(checkPpm({ ppm: null, ec: 400, ecScale: 0.6, ph: null })).toBeNull();
    expect(checkPpm({ ppm: null, ec: null, ecScale: null, ph: 6 })).toBeNull();
  });

  it("the same 200 µS/cm is fine on one scale and over the 100 ppm line on the other (common practice)", () => {
    expect(waterVerdict({ ppm: checkPpm({ ppm: null, ec: 200, ecScale: 0.5, ph: 6 }), ph: 6 }).verdict).toBe("good");
    expect(waterVerdict({ ppm: checkPpm({ ppm: null, ec: 200, ecScale: 0.7, ph: 6 }), ph: 6 }).verdict).toBe("avoid");
  });
});

describe("labels", () => {
  it("says where the ppm came from", () => {
    expect(ppmLabel({ ppm: 15, ec: null, ecScale: null, ph: null })).toBe("15 ppm (TDS)");
    expect(ppmLabel({ ppm: null, ec: 560, ecScale: 0.5, ph: null })).toBe("560 µS/cm × 0.5 (NaCl scale) ≈ 280 ppm");
    expect(ppmLabel({ ppm: null, ec: 400, ecScale: 0.7, ph: null })).toBe("400 µS/cm × 0.7 (442 scale) ≈ 280 ppm");
  });

  it("names sources", () => {
    expect(sourceName("rain")).toBe("Rain water");
    expect(sourceName("Water butt by the shed")).toBe("Water butt by the shed");
    expect(parseSource("other", "  Water  butt ")).toBe("Water butt");
    expect(parseSource("other", "Rain")).toBe("rain");
    expect(parseSource("other", "")).toBeNull();
    expect(parseSource("tap", "")).toBe("tap");
  });
});
