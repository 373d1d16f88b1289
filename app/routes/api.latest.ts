import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { latestReading } from "~/.server/series";
import { getSpot } from "~/.server/spots";
import type { Route } from "./+types/api.latest";

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  return Response.json({ latest: await latestReading(spot.id) }, { headers: { "Cache-Control": "no-store" } });
}
