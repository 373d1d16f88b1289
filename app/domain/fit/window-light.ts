// Light judged from the window when a spot has no light sensor: the direct-sun estimate for its
// facing (directSunMonths) against the group's light class. Walls, trees and frosted glass can only
// take light away from the estimate, so only a low-light group behind a window without hot sun is
// judged fine from it; for the rest the estimate says what the sun's path allows and what is not known.
import type { CheckResult } from "~/domain/fit/facts";
import type { PlantProfile } from "~/domain/plants/library";
import { directSunMonths } from "~/domain/climate/sun";
import type { SpotFacing } from "~/domain/vocabulary";

export type SpotWindow = { latitude: number; facing: SpotFacing; indoor: boolean };

/**
 * Our lines (common practice; AOS culture sheets: high-light groups want "bright light, some
 * direct sun", low-light groups "little or no direct sun"):
 * - a month of strong sun has at least STRONG_SUN_HOURS of sun striking the glass within 60° of
 *   square-on (faceOnHours);
 * - high-light groups want at least HIGH_LIGHT_MIN_STRONG_MONTHS such months;
 * - low-light groups scorch behind a window whose strong sun comes with the sun high (noon
 *   elevation ≥ SCORCH_MIN_ELEVATION) in SCORCH_MIN_MONTHS months or more — a south, south-east,
 *   south-west or west window in spring and summer; morning sun through an east window is gentle.
 */
export const STRONG_SUN_HOURS = 4;
export const HIGH_LIGHT_MIN_STRONG_MONTHS = 6;
export const SCORCH_MIN_ELEVATION = 35;
export const SCORCH_MIN_MONTHS = 3;
const HOT_FACINGS = new Set(["SE", "S", "SW", "W"]);

export function windowLight(profile: PlantProfile, window: SpotWindow): CheckResult {
  const need = profile.light;
  if (!window.indoor) {
    return {
      rule: "light",
      level: "unknown",
      noData: true,
      facts: [{ kind: "light-unknown", need, minDli: profile.dliMin, maxDli: profile.dliMax, reason: "outdoor" }],
    };
  }
  if (window.facing === "none") {
    return {
      rule: "light",
      level: "unknown",
      noData: true,
      facts: [{ kind: "light-unknown", need, minDli: profile.dliMin, maxDli: profile.dliMax, reason: "no-sensor" }],
    };
  }
  const est = directSunMonths(window.latitude, window.facing).months ?? [];
  const strong = est.filter((m) => m.faceOnHours >= STRONG_SUN_HOURS);
  const hot = HOT_FACINGS.has(window.facing)
    ? strong.filter((m) => m.noonElevation >= SCORCH_MIN_ELEVATION).map((m) => m.month)
    : [];
  // In the southern hemisphere the sun stands in the north: swap the hot facings.
  const hotMonths =
    window.latitude < 0
      ? ["NE", "N", "NW", "W"].includes(window.facing)
        ? strong.filter((m) => m.noonElevation >= SCORCH_MIN_ELEVATION).map((m) => m.month)
        : []
      : hot;
  const base = {
    facing: window.facing,
    sunnyMonths: strong.length,
    strongSunMonths: strong.map((m) => m.month),
    need,
  } as const;
  if (need === "low") {
    if (hotMonths.length >= SCORCH_MIN_MONTHS) {
      return {
        rule: "light",
        level: "care",
        months: hotMonths.map((m) => String(m).padStart(2, "0")),
        facts: [{ kind: "light-window", ...base, strongSunMonths: hotMonths, verdict: "scorch" }],
      };
    }
    return { rule: "light", level: "good", facts: [{ kind: "light-window", ...base, verdict: "fits" }] };
  }
  if (need === "high" && strong.length < HIGH_LIGHT_MIN_STRONG_MONTHS) {
    return { rule: "light", level: "care", facts: [{ kind: "light-window", ...base, verdict: "shade" }] };
  }
  if (need === "medium" && strong.length < 3) {
    return { rule: "light", level: "care", facts: [{ kind: "light-window", ...base, verdict: "shade" }] };
  }
  // The sun's path allows it; how much reaches the plant is not known without a sensor.
  return { rule: "light", level: "unknown", facts: [{ kind: "light-window", ...base, verdict: "fits" }] };
}
