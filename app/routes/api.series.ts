import { data } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { spotSeries } from "~/.server/series";
import { getSite, getSpot } from "~/.server/sites";
import type { Route } from "./+types/api.series";

const RANGES = ["48h", "30d", "year"] as const;

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  const range = new URL(request.url).searchParams.get("range") ?? "48h";
  if (!(RANGES as readonly string[]).includes(range)) throw data(`range is one of ${RANGES.join(", ")}`, { status: 400 });
  const series = await spotSeries(spot.id, site.timeZone, range as (typeof RANGES)[number]);
  return Response.json(series, { headers: { "Cache-Control": "private, max-age=30" } });
}
