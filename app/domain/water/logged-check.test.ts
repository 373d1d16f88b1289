import { describe, it, expect } from "vitest";
import { checkEc, checkPpm, checkSample, parseSource, ppmLabel, sourceName } from "~/domain/water/logged-check";
import { waterVerdict } from "~/domain/water/verdict";

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

  it("gives no ppm for an EC reading without a scale", () => {
    expect(checkPpm({ ppm: null, ec: 400, ecScale: null, ph: null })).toBeNull();
  });
});

describe("checkEc", () => {
  it("is exact for an EC reading or a TDS reading of known scale, and unknown otherwise", () => {
    expect(checkEc({ ppm: null, ec: 400, ecScale: null, ph: null })).toBe(400);
    expect(checkEc({ ppm: 280, ec: null, ecScale: 0.7, ph: null })).toBeCloseTo(400, 9);
    expect(checkEc({ ppm: 280, ec: null, ecScale: null, ph: null })).toBeNull();
  });

  // Issue 15: 200 µS/cm was fine on the 0.5 scale and not on the 0.7 one. The rule is in µS/cm
  // (common practice: 200 µS/cm = 100 ppm on the NaCl scale), so the scale no longer decides it.
  it("gives a 200 µS/cm reading the same verdict whatever scale the meter was set to", () => {
    for (const ecScale of [0.5, 0.7, null]) {
      expect(waterVerdict(checkSample({ ppm: null, ec: 200, ecScale, ph: 6 })).verdict).toBe("good");
      expect(waterVerdict(checkSample({ ppm: null, ec: 260, ecScale, ph: 6 })).verdict).toBe("avoid");
    }
  });
});

describe("labels", () => {
  it("says where the ppm came from", () => {
    expect(ppmLabel({ ppm: 15, ec: null, ecScale: null, ph: null })).toBe(
      "15 ppm (TDS, scale not given) = 21–30 µS/cm",
    );
    expect(ppmLabel({ ppm: 15, ec: null, ecScale: 0.5, ph: null })).toBe("15 ppm (TDS, 0.5 scale) = 30 µS/cm");
    expect(ppmLabel({ ppm: null, ec: 560, ecScale: 0.5, ph: null })).toBe(
      "560 µS/cm (EC) = 280 ppm on a 0.5 meter, 392 on a 0.7",
    );
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
