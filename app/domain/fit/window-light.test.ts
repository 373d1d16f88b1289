import { describe, expect, it } from "vitest";
import { fitPlant } from "~/domain/fit/verdict";
import { spotYear } from "~/domain/fit/season-fixture";
import { windowLight } from "~/domain/fit/window-light";
import { describeReason } from "~/domain/fit/describe";
import { plantByKey } from "~/domain/plants/library";

// Direct sun from suncalc's sun path (see sun.test.ts); the lines are common practice (window-light.ts).
const cattleya = plantByKey("cattleya")!;
const vanda = plantByKey("vanda")!;
const phal = plantByKey("phalaenopsis")!;
const w = (facing: "N" | "NE" | "E" | "S" | "SW" | "W" | "none", indoor = true) => ({ latitude: 51.5, facing, indoor });

describe("windowLight", () => {
  it("asks for care for a high-light group behind a north or north-east window at 51.5° N", () => {
    expect(windowLight(cattleya, w("N"))).toMatchObject({
      rule: "light",
      level: "care",
      facts: [{ kind: "light-window", verdict: "shade" }],
    });
    const ne = windowLight(vanda, w("NE"));
    expect(ne).toMatchObject({ level: "care", facts: [{ verdict: "shade" }] });
    expect(describeReason(ne, undefined, "Vanda")).toMatch(
      /north-east-facing window gets a few hours of strong sun in (no month|only \d+ months?)/,
    );
  });

  it("east and west windows don't give Vanda enough strong sun either (AOS: strong light)", () => {
    expect(windowLight(vanda, w("E")).level).toBe("care");
    expect(windowLight(vanda, w("W")).level).toBe("care");
  });

  it("a south window allows a high-light group, but that is an estimate: unknown, never the top level", () => {
    expect(windowLight(cattleya, w("S"))).toMatchObject({ level: "unknown", facts: [{ verdict: "fits" }] });
  });

  it("warns of scorch for a low-light group behind a south, south-west or west window, not an east one", () => {
    for (const f of ["S", "SW", "W"] as const)
      expect(windowLight(phal, w(f)), f).toMatchObject({ level: "care", facts: [{ verdict: "scorch" }] });
    expect(windowLight(phal, w("E"))).toMatchObject({ level: "good", facts: [{ verdict: "fits" }] });
    expect(windowLight(phal, w("N")).level).toBe("good");
  });

  it("in the southern hemisphere the hot window faces north (Sydney, 33.9° S)", () => {
    expect(windowLight(phal, { latitude: -33.9, facing: "N", indoor: true })).toMatchObject({
      level: "care",
      facts: [{ verdict: "scorch" }],
    });
    expect(windowLight(phal, { latitude: -33.9, facing: "S", indoor: true }).level).toBe("good");
  });

  it("says light is unknown with no facing set, and outdoors", () => {
    expect(windowLight(cattleya, w("none"))).toMatchObject({
      level: "unknown",
      facts: [{ kind: "light-unknown", reason: "no-sensor" }],
    });
    expect(describeReason(windowLight(cattleya, w("none")))).toContain("no window facing set");
    expect(windowLight(cattleya, w("none", false))).toMatchObject({ level: "unknown", facts: [{ reason: "outdoor" }] });
  });
});

describe("fitPlant with a window", () => {
  it("judges light from the window only when there is no light sensor", () => {
    const room = spotYear(); // no light readings
    expect(fitPlant(cattleya, room, undefined, w("N")).reasons.find((r) => r.rule === "light")).toMatchObject({
      level: "care",
    });
    expect(fitPlant(cattleya, room).reasons.find((r) => r.rule === "light")).toMatchObject({
      level: "unknown",
      noData: true,
    });
    const lit = spotYear({ month: () => ({ night: 18, day: 24, lux: 20000 }) });
    expect(fitPlant(cattleya, lit, undefined, w("N")).reasons.find((r) => r.rule === "light")!.facts[0].kind).toBe(
      "light-months",
    );
  });
});
