// What the spot page shows about growing there, beyond the season: the plants standing in it now
// (with the most tender one, for alerts), the other spots they could move to, and the direct-sun
// estimate for its window.
import { listSpots } from "~/.server/spots";
import { type listSensors } from "~/.server/sensors.server";
import { mostTender, spotInventory, type SitePlant } from "~/.server/plants";
import { directSunMonths } from "~/domain/climate/sun";
import type { Site, Spot } from "~/db/schema.server";

/** `sensors`: the site's sensors, as the spot page has already read them. */
export async function spotGrowing(
  site: Site,
  spot: Spot,
  plants: SitePlant[],
  fits: { key: string; verdict: string }[],
  sensors: Awaited<ReturnType<typeof listSensors>>,
) {
  const [standing, spots] = await Promise.all([spotInventory([spot.id]), listSpots(site.id)]);
  const byKey = new Map(plants.map((p) => [p.key, p]));
  const verdicts = new Map(fits.map((f) => [f.key, f.verdict]));
  const tender = mostTender(standing, plants);
  return {
    standing: standing.map((s) => ({
      id: s.id,
      plantKey: s.plantKey,
      plantName: byKey.get(s.plantKey)?.name ?? `${s.plantKey} (profile removed)`,
      nickname: s.nickname,
      pots: s.pots,
      verdict: verdicts.get(s.plantKey) ?? null,
    })),
    tender: tender ? { name: tender.nickname || tender.plant.name, minNightC: tender.plant.minNightC } : null,
    otherSpots: spots.filter((s) => s.id !== spot.id).map((s) => ({ id: s.id, name: s.name })),
    directSun: directSunMonths(site.latitude, spot.facing),
    hasLightSensor: sensors.some((s) => s.spotId === spot.id && s.channels.includes("lux")),
  };
}
