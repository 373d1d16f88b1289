// The cold watch an outdoor spot gets before anyone sets one: the lowest safe night of the most
// cold-tender plant placed there plus a margin, so the warning comes while there is still time to act.
import type { PlantProfile } from "~/domain/plants/library";

/** Degrees above the plant's lowest safe night (common practice: act before the limit, not at it). */
export const DEFAULT_MARGIN_C = 2;
export const NO_PLANTS_THRESHOLD_C = 10;

export type DefaultWatch = { threshold: number; reason: string };

export function defaultColdWatch(placed: { plantKey: string; nickname?: string }[], library: Pick<PlantProfile, "key" | "name" | "minNightC">[]): DefaultWatch {
  let tender: { name: string; minNightC: number } | null = null;
  for (const p of placed) {
    const profile = library.find((l) => l.key === p.plantKey);
    if (!profile) continue;
    if (!tender || profile.minNightC > tender.minNightC) {
      tender = { name: p.nickname ? `${p.nickname} (${profile.name})` : profile.name, minNightC: profile.minNightC };
    }
  }
  if (!tender) {
    return {
      threshold: NO_PLANTS_THRESHOLD_C,
      reason: `No plants are placed here yet, so the watch uses ${NO_PLANTS_THRESHOLD_C} °C, a safe line for most tropical plants left outdoors. Place plants in this spot to have it follow the most tender one.`,
    };
  }
  const threshold = tender.minNightC + DEFAULT_MARGIN_C;
  return {
    threshold,
    reason: `${tender.name} is the most cold-tender plant here: its lowest safe night is ${tender.minNightC} °C, plus a ${DEFAULT_MARGIN_C} °C margin so you hear before it gets there.`,
  };
}
