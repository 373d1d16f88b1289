// The cold watch an outdoor spot gets when a plant is placed in it: the lowest safe night of the most
// cold-tender plant placed there plus a margin, so the warning comes while there is still time to act.
// An empty spot gets none: a fixed line for "most tropical plants" e-mailed everyone most nights of
// the year about a bench with nothing on it.
import type { PlantProfile } from "~/domain/plants/library";

/** Degrees above the plant's lowest safe night (common practice: act before the limit, not at it). */
export const DEFAULT_MARGIN_C = 2;

export type DefaultWatch = { threshold: number; reason: string };

export function defaultColdWatch(
  placed: { plantKey: string; nickname?: string }[],
  library: Pick<PlantProfile, "key" | "name" | "minNightC">[],
): DefaultWatch | null {
  let tender: { name: string; minNightC: number } | null = null;
  for (const p of placed) {
    const profile = library.find((l) => l.key === p.plantKey);
    if (!profile) continue;
    if (!tender || profile.minNightC > tender.minNightC) {
      tender = { name: p.nickname ? `${p.nickname} (${profile.name})` : profile.name, minNightC: profile.minNightC };
    }
  }
  if (!tender) return null;
  const threshold = tender.minNightC + DEFAULT_MARGIN_C;
  return {
    threshold,
    reason:
      `${tender.name} is the most cold-tender plant here: its lowest ` +
      `safe night is ${tender.minNightC} °C, plus a ${DEFAULT_MARGIN_C}` +
      ` °C margin so you hear before it gets there.`,
  };
}
