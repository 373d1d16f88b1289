import { describe, it, expect } from "vitest";
import fc from "fast-check";
import psychrolib from "psychrolib";
import { MAGNUS_WATER, cToF, dewPoint, dewPointMargin, fToC, saturationVapourPressure } from "~/domain/climate/psychro";

// Reference library: psychrolib 1.1.1, the ASHRAE Handbook — Fundamentals (2017) ch. 1 equations
// (Hyland & Wexler 1983). It works in Pa and takes RH as a fraction.
psychrolib.SetUnitSystem(psychrolib.SI);

const temperatures = Array.from({ length: 80 }, (_, i) => 0.5 + i * 0.5); // 0.5 … 40 °C
const humidities = Array.from({ length: 19 }, (_, i) => 10 + i * 5); // 10 … 100 %

describe("constants", () => {
  it("is the Alduchov & Eskridge (1996) set over water", () => {
    expect(MAGNUS_WATER).toEqual({ c: 6.1094, a: 17.625, b: 243.04 });
  });
});

describe("saturationVapourPressure", () => {
  // Check values computed with the Alduchov–Eskridge set (shared/REFERENCES.md).
  it("gives 23.33 hPa at 20 °C and 6.11 hPa at 0 °C", () => {
    expect(saturationVapourPressure(20)).toBeCloseTo(23.33, 2);
    expect(saturationVapourPressure(0)).toBeCloseTo(6.11, 2);
  });

  // ASHRAE Handbook — Fundamentals 2017, ch. 1, Table 3: 3169.7 Pa at 25 °C, 872.6 Pa at 5 °C.
  // Tolerance 0.3 %: the Magnus fit sits below Hyland–Wexler by up to 0.24 % near 25 °C (see the
  // grid below), and 3161.7 Pa against the table's 3169.7 Pa is −0.25 %. Alduchov & Eskridge
  // report a maximum relative error of 0.384 % over −40…50 °C (from memory). A 0.2 % bound would
  // not hold for this constant set near 25 °C.
  it("agrees with the ASHRAE table within 0.3 %", () => {
    expect(Math.abs((saturationVapourPressure(25) * 100) / 3169.7 - 1)).toBeLessThan(0.003);
    expect(Math.abs((saturationVapourPressure(5) * 100) / 872.6 - 1)).toBeLessThan(0.003);
  });

  it("psychrolib reproduces those ASHRAE table values (so it is a fair reference)", () => {
    expect(psychrolib.GetSatVapPres(25)).toBeCloseTo(3169.7, 0);
    expect(psychrolib.GetSatVapPres(5)).toBeCloseTo(872.6, 0);
  });

  it("agrees with psychrolib within 0.25 % from 0.5 to 40 °C", () => {
    for (const t of temperatures) {
      const ours = saturationVapourPressure(t) * 100;
      const ashrae = psychrolib.GetSatVapPres(t);
      expect(Math.abs(ours / ashrae - 1), `${t} °C`).toBeLessThan(0.0025);
    }
  });
});

describe("dewPoint", () => {
  // Check values computed with the Alduchov–Eskridge set (shared/REFERENCES.md).
  it.each([
    [20, 50, 9.26],
    [20, 80, 16.44],
    [30, 60, 21.39],
    [10, 70, 4.78],
  ])("%d °C at %d %% → %d °C", (t, rh, expected) => {
    expect(dewPoint(t, rh)).toBeCloseTo(expected, 2);
  });

  // Tolerance 0.1 °C: the ≤ 0.24 % pressure difference above is worth under 0.04 K of dew point
  // (d ln e_s/dT ≈ 0.06 K⁻¹) and largely cancels in the ratio; 0.1 °C is also a tenth of what a
  // ±2 % RH hobby sensor is good for, so it cannot change what a grower is told.
  // psychrolib inverts the ice curve when the dew point falls below 0.01 °C (it returns a frost
  // point), so those grid points are left out: the dew point here is always over liquid water.
  it("agrees with psychrolib within 0.1 °C on a grid of 0.5–40 °C × 10–100 % RH", () => {
    let compared = 0;
    for (const t of temperatures) {
      for (const rh of humidities) {
        const ashrae = psychrolib.GetTDewPointFromRelHum(t, rh / 100);
        if (ashrae <= 0.01) continue;
        expect(Math.abs(dewPoint(t, rh) - ashrae), `${t} °C, ${rh} %`).toBeLessThan(0.1);
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(1000);
  });

  it("clamps RH above 100 % to saturation and gives NaN at or below 0 %", () => {
    expect(dewPoint(18, 103)).toBe(18);
    expect(dewPoint(18, 0)).toBeNaN();
    expect(dewPoint(18, -4)).toBeNaN();
    expect(dewPoint(18, Number.NaN)).toBeNaN();
  });

  const air = fc.double({ min: -30, max: 45, noNaN: true });
  const rh = fc.double({ min: 0.5, max: 100, noNaN: true });

  it("is never above the air temperature", () => {
    fc.assert(fc.property(air, rh, (t, h) => dewPoint(t, h) <= t));
  });

  it("does not fall as RH rises", () => {
    fc.assert(
      fc.property(air, rh, rh, (t, h1, h2) => {
        const [lo, hi] = h1 <= h2 ? [h1, h2] : [h2, h1];
        // Within rounding: two RH values a few ulps apart can round the logarithm either way.
        return dewPoint(t, lo) <= dewPoint(t, hi) + 1e-9;
      }),
    );
  });

  it("equals the air temperature at 100 %", () => {
    fc.assert(fc.property(air, (t) => Math.abs(dewPoint(t, 100) - t) < 1e-9));
  });
});

describe("dewPointMargin", () => {
  it("is the air temperature minus the dew point", () => {
    expect(dewPointMargin(20, 50)).toBeCloseTo(20 - 9.26, 2);
    expect(dewPointMargin(15, 100)).toBe(0);
  });

  it("is NaN for a 0 % reading (a sensor fault, not a margin)", () => {
    expect(dewPointMargin(20, 0)).toBeNaN();
  });

  it("is never negative", () => {
    fc.assert(
      fc.property(
        fc.double({ min: -30, max: 45, noNaN: true }),
        fc.double({ min: 0.5, max: 120, noNaN: true }),
        (t, h) => dewPointMargin(t, h) >= 0,
      ),
    );
  });
});

describe("cToF / fToC", () => {
  it("convert the fixed points of water and round-trip", () => {
    expect(cToF(0)).toBe(32);
    expect(cToF(100)).toBe(212);
    expect(fToC(-40)).toBe(-40);
    // The orchid night categories quoted in °F by grower societies: 55 °F ≈ 13 °C.
    expect(fToC(55)).toBeCloseTo(12.78, 2);
    fc.assert(fc.property(fc.double({ min: -100, max: 100, noNaN: true }), (t) => Math.abs(fToC(cToF(t)) - t) < 1e-9));
  });
});
