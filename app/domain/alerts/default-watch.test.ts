import { describe, expect, it } from "vitest";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { DEFAULT_MARGIN_C, defaultColdWatch } from "./default-watch";

describe("defaultColdWatch", () => {
  it("gives no watch to a spot with no plants (an empty bench needs no cold-snap e-mails)", () => {
    expect(defaultColdWatch([], PLANT_LIBRARY)).toBeNull();
  });

  it("follows the most cold-tender plant: its lowest safe night plus the margin", () => {
    const tender = [...PLANT_LIBRARY].sort((a, b) => b.minNightC - a.minNightC)[0];
    const hardy = [...PLANT_LIBRARY].sort((a, b) => a.minNightC - b.minNightC)[0];
    const w = defaultColdWatch(
      [{ plantKey: hardy.key }, { plantKey: tender.key, nickname: "Big pink" }],
      PLANT_LIBRARY,
    );
    expect(w!.threshold).toBe(tender.minNightC + DEFAULT_MARGIN_C);
    expect(w!.reason).toContain("Big pink");
    expect(w!.reason).toContain(`${tender.minNightC} °C`);
  });

  it("ignores plant keys it does not know", () => {
    expect(defaultColdWatch([{ plantKey: "no-such-plant" }], PLANT_LIBRARY)).toBeNull();
  });
});
