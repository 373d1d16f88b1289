import { describe, expect, it } from "vitest";
import { fitPlant } from "~/domain/fit/verdict";
import { spotYear } from "~/domain/fit/season-fixture";
import { windowLight } from "~/domain/fit/window-light";
import { plantByKey } from "~/domain/plants/library";

// Direct sun from suncalc's sun path (see sun.test.ts); the 6-month line is common practice.
const cattleya = plantByKey("cattleya")!;
const phal = plantByKey("phalaenopsis")!;

describe("windowLight", () => {
  it("asks for care for a high-light group behind a north window at 51.7° N", () => {
    const r = windowLight(cattleya, { latitude: 51.7, facing: "N", indoor: true });
    expect(r).toMatchObject({ rule: "light", level: "care" });
    expect(r!.message).toMatch(/direct sun in (no month|only \d months?) of the year/);
  });

  it("leaves a south window alone: low winter sun and some sun all year", () => {
    expect(windowLight(cattleya, { latitude: 51.7, facing: "S", indoor: true })).toBeNull();
  });

  it("says what to do when no facing is set", () => {
    expect(windowLight(cattleya, { latitude: 51.7, facing: "none", indoor: true })?.message).toContain("no window facing set");
  });

  it("does not judge low-light groups or outdoor spots", () => {
    expect(windowLight(phal, { latitude: 51.7, facing: "N", indoor: true })).toBeNull();
    expect(windowLight(cattleya, { latitude: 51.7, facing: "none", indoor: false })).toBeNull();
  });
});

describe("fitPlant with a window", () => {
  it("judges light from the window only when there is no light sensor", () => {
    const room = spotYear(); // no light readings
    const north = { latitude: 51.7, facing: "N" as const, indoor: true };
    expect(fitPlant(cattleya, room, undefined, north).reasons.find((r) => r.rule === "light")).toMatchObject({ level: "care" });
    expect(fitPlant(cattleya, room).reasons.find((r) => r.rule === "light")).toMatchObject({ level: "ok", noData: true });
  });
});
