import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { LIGHT_SOURCES } from "~/domain/vocabulary";
import {
  LIGHT_SOURCE_LABELS,
  LIGHT_SOURCE_LUX_PER_PPFD,
  LUX_PER_FOOT_CANDLE,
  LUX_PER_PPFD,
  ORCHID_LIGHT_BANDS,
  SUNLIGHT_LUX_PER_PPFD,
  dliFromConstantPpfd,
  dliFromHourlyMeanLux,
  dliFromPeakLuxSineDay,
  footCandlesToLux,
  lightBandForDli,
  luxPerPpfdFor,
  luxToFootCandles,
  luxToPpfd,
} from "~/domain/climate/light";

describe("lux to PPFD", () => {
  // Thimijan & Heins (1983), HortScience 18, 818–822: sun and sky daylight 54 lux per µmol m⁻² s⁻¹;
  // cool white fluorescent 74, high-pressure sodium 82, metal halide 71, incandescent 50 (the
  // lamp factors as reproduced in secondary tables citing that paper).
  it("uses the Thimijan & Heins factors", () => {
    expect(SUNLIGHT_LUX_PER_PPFD).toBe(54);
    expect(LUX_PER_PPFD).toEqual({
      sunlight: 54,
      coolWhiteFluorescent: 74,
      highPressureSodium: 82,
      metalHalide: 71,
      incandescent: 50,
    });
  });

  it("turns 108,000 lux of full sun into 2,000 µmol m⁻² s⁻¹ (54 × 2000)", () => {
    expect(luxToPpfd(108_000)).toBeCloseTo(2000, 9);
  });

  it("takes another factor for lamps", () => {
    expect(luxToPpfd(8200, LUX_PER_PPFD.highPressureSodium)).toBeCloseTo(100, 9);
  });
});

describe("foot-candles", () => {
  // 1 fc = 1 lm/ft² = 10.764 lux (shared/REFERENCES.md; the foot is 0.3048 m exactly).
  it("converts at 10.764 lux per foot-candle", () => {
    expect(LUX_PER_FOOT_CANDLE).toBeCloseTo(10.764, 3);
    expect(footCandlesToLux(1000)).toBeCloseTo(10_763.9, 1);
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e6, noNaN: true }),
        (lux) => Math.abs(footCandlesToLux(luxToFootCandles(lux)) - lux) <= 1e-9 * Math.max(1, lux),
      ),
    );
  });
});

describe("daily light integral", () => {
  // Torres & Lopez, Purdue Extension HO-238-W: DLI = PPFD × 0.0036 × hours.
  // Checks computed in shared/REFERENCES.md.
  it("is 8.64 mol for 200 µmol over 12 h", () => {
    expect(dliFromConstantPpfd(200, 12)).toBeCloseTo(8.64, 9);
  });

  it("is 6.67 mol for 10 klux of sunlight over 10 h", () => {
    expect(dliFromHourlyMeanLux(Array(10).fill(10_000))).toBeCloseTo(6.67, 2);
    expect(dliFromConstantPpfd(luxToPpfd(10_000), 10)).toBeCloseTo(6.67, 2);
  });

  it("sums the hours of a day and skips hours without data", () => {
    const day = [0, 0, 0, 0, 0, 0, 2000, 8000, 15000, 20000, 22000, 20000, 15000, 8000, 2000, 0];
    const expected = day.reduce((sum, lux) => sum + (lux / 54) * 0.0036, 0);
    expect(dliFromHourlyMeanLux(day)).toBeCloseTo(expected, 12);
    expect(dliFromHourlyMeanLux([...day, Number.NaN, -1])).toBeCloseTo(expected, 12);
    expect(dliFromHourlyMeanLux([])).toBe(0);
  });

  it("equals the constant-PPFD form when every hour is the same", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 120_000, noNaN: true }), fc.integer({ min: 0, max: 24 }), (lux, h) => {
        const a = dliFromHourlyMeanLux(Array(h).fill(lux));
        const b = dliFromConstantPpfd(luxToPpfd(lux), h);
        return Math.abs(a - b) <= 1e-9 * Math.max(1, b);
      }),
    );
  });

  it("of a half-sine day is 2/π of the peak held all day", () => {
    expect(dliFromPeakLuxSineDay(54_000, 12)).toBeCloseTo((1000 * 0.0036 * 12 * 2) / Math.PI, 9);
  });
});

describe("orchid light bands (common practice, figures from memory)", () => {
  it("run low → medium → high without gaps, from 1,000 to 5,000 fc", () => {
    const [low, medium, high] = ORCHID_LIGHT_BANDS;
    expect(luxToFootCandles(low.middayLuxMin)).toBeCloseTo(1000, 6);
    expect(low.middayLuxMax).toBe(medium.middayLuxMin);
    expect(medium.middayLuxMax).toBe(high.middayLuxMin);
    expect(luxToFootCandles(high.middayLuxMax)).toBeCloseTo(5000, 6);
    expect(low.dliMax).toBe(medium.dliMin);
    expect(medium.dliMax).toBe(high.dliMin);
  });

  it("put a low-light orchid around 5–8 mol per day (computed for a 12 h day)", () => {
    const [low] = ORCHID_LIGHT_BANDS;
    expect(low.dliMin).toBeCloseTo(5.5, 1);
    expect(low.dliMax).toBeCloseTo(8.2, 1);
  });

  it("place a DLI in a band, edges going to the brighter band", () => {
    const [low, medium, high] = ORCHID_LIGHT_BANDS;
    expect(lightBandForDli(low.dliMin - 0.01)).toBe("below-low");
    expect(lightBandForDli(low.dliMin)).toBe("low");
    expect(lightBandForDli(medium.dliMin - 0.01)).toBe("low");
    expect(lightBandForDli(medium.dliMin)).toBe("medium");
    expect(lightBandForDli(high.dliMin)).toBe("high");
    expect(lightBandForDli(high.dliMax)).toBe("high");
    expect(lightBandForDli(high.dliMax + 0.01)).toBe("above-high");
  });
});

describe("light source per spot", () => {
  // Sun and cool-white fluorescent: Thimijan & Heins (1983), HortScience 18, 818–822. White LED:
  // 70 (memory, the middle of ~65–75 computed from white LED spectra); mixed: halfway (our choice).
  it("picks the lux → PPFD factor of each source, sunlight by default", () => {
    expect(LIGHT_SOURCE_LUX_PER_PPFD).toEqual({ sun: 54, led: 70, fluorescent: 74, mixed: 62 });
    expect(luxPerPpfdFor("led")).toBe(70);
    expect(luxPerPpfdFor(undefined)).toBe(SUNLIGHT_LUX_PER_PPFD);
    expect(luxPerPpfdFor("nonsense")).toBe(SUNLIGHT_LUX_PER_PPFD);
    expect(LIGHT_SOURCES.every((s) => LIGHT_SOURCE_LABELS[s].length > 0)).toBe(true);
  });

  it("gives a lamp-lit shelf less plant light than the same lux of daylight", () => {
    // 10,800 lux for 12 h: 8.64 mol m⁻² d⁻¹ as sunlight (REFERENCES check), 6.66 under white LEDs.
    const hours = Array.from({ length: 12 }, () => 10_800);
    expect(dliFromHourlyMeanLux(hours, luxPerPpfdFor("sun"))).toBeCloseTo(8.64, 9);
    expect(dliFromHourlyMeanLux(hours, luxPerPpfdFor("led"))).toBeCloseTo((10_800 / 70) * 0.0036 * 12, 9);
  });
});
