// Demo alerts: the default cold watch (and a silent-sensor watch) on every outdoor spot of the demo site.
import { ensureDefaultWatch, outdoorSpotIds } from "~/.server/alerts/queries";

export async function seedAlerts(siteId: number, log: (s: string) => void = console.log) {
  for (const spotId of await outdoorSpotIds(siteId)) {
    const added = await ensureDefaultWatch(spotId, siteId);
    if (added.length) log(`Alerts: default ${added.join(" and ")} watch on spot ${spotId}`);
  }
}
