import { data } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { spotSeries } from "~/.server/series";
import { getSite } from "~/.server/sites";
import { getSpot } from "~/.server/spots";
import { DEFAULT_FORMAT } from "~/domain/fit/describe";
import type { Route } from "./+types/api.series";

const RANGES = ["48h", "30d", "year"] as const;
const SPAN_DAYS = { "48h": 2, "30d": 30, year: 365 } as const;

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  const range = new URL(request.url).searchParams.get("range") ?? "48h";
  if (!(RANGES as readonly string[]).includes(range))
    throw data(`range is one of ${RANGES.join(", ")}`, { status: 400 });
  const now = new Date();
  const series = await spotSeries(spot.id, site.timeZone, range as (typeof RANGES)[number], now);
  // The span asked for and how to write its dates, so a chart keeps its 48 hours or its year on the axis
  // however little has been read, in the site's own dates.
  const to = Math.floor(now.getTime() / 1000);
  const from = to - SPAN_DAYS[range as (typeof RANGES)[number]] * 86_400;
  return Response.json(
    { ...series, from, to, locale: DEFAULT_FORMAT.locale, timeZone: site.timeZone },
    { headers: { "Cache-Control": "private, max-age=30" } },
  );
}
