// Demo alerts: the default cold watch (and a silent-sensor watch) on every outdoor spot of the demo
// site that has plants in it, as placing them would have made. Empty spots get none.
import { outdoorSpotIds } from "~/.server/alerts/pages";
import { ensureColdWatch } from "~/.server/watches";

export async function seedAlerts(siteId: number, log: (s: string) => void = console.log) {
  for (const spotId of await outdoorSpotIds(siteId)) {
    const added = await ensureColdWatch({ siteId, spotId, actorId: null });
    if (added.length) log(`Alerts: default ${added.join(" and ")} watch on spot ${spotId}`);
  }
}
