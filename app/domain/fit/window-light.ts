// Light judged from the window when a spot has no light sensor: the direct-sun estimate for its
// facing (directSunMonths) against the group's light class. Only the clear case is judged — a
// high-light group behind a window that gets little or no direct sun — since walls, trees and
// frosted glass can only take light away from the estimate, never add it.
import type { RuleResult } from "~/domain/fit/rules";
import type { PlantProfile } from "~/domain/plants/library";
import { directSunMonths, type SpotFacing } from "~/domain/climate/sun";

export type SpotWindow = { latitude: number; facing: SpotFacing; indoor: boolean };

/**
 * High-light groups (Cattleya, Vanda, Cymbidium…) want direct sun for part of the day through much
 * of the year (AOS culture sheets: "bright light, some direct sun"). Our line, common practice: at
 * least 6 months with an hour or more of direct sun on the 21st.
 */
export const HIGH_LIGHT_MIN_SUNNY_MONTHS = 6;
const SUNNY_HOURS = 1;

export function windowLight(profile: PlantProfile, window: SpotWindow): RuleResult | null {
  if (profile.light !== "high" || !window.indoor) return null;
  const wants = "this group wants high light, with some direct sun";
  if (window.facing === "none") {
    return {
      rule: "light",
      level: "care",
      message: `No light sensor here and no window facing set for this spot; ${wants}. Check it gets sun for part of the day, add a grow light, or add a light sensor to judge it.`,
    };
  }
  const est = directSunMonths(window.latitude, window.facing);
  const sunny = (est.months ?? []).filter((m) => m.hours >= SUNNY_HOURS).length;
  if (sunny >= HIGH_LIGHT_MIN_SUNNY_MONTHS) return null;
  return {
    rule: "light",
    level: "care",
    message: `No light sensor here; by the sun's path this window gets an hour or more of direct sun in ${sunny === 0 ? "no month" : `only ${sunny} ${sunny === 1 ? "month" : "months"}`} of the year, and ${wants}. It may grow but rarely flower without a grow light.`,
  };
}
