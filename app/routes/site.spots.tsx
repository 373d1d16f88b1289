import { sql } from "drizzle-orm";
import { Link } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { db } from "~/.server/db";
import { listSpots } from "~/.server/sites";
import { useNow } from "~/components/use-now";
import { formatTemp } from "~/lib/units";
import { timeAgo } from "~/lib/time";
import type { Route } from "./+types/site.spots";

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spots = await listSpots(siteId);
  // The newest hour of each spot, from the rollups (cheap; the spot page shows the live reading).
  const latest = await db().execute<{ spot_id: number; hour: string; t: number | null; h: number | null }>(sql`
    select distinct on (spot_id) spot_id, hour, t_sum / nullif(t_n, 0) as t, h_sum / nullif(h_n, 0) as h
    from hourly_rollups where spot_id in (select id from spots where site_id = ${siteId})
    order by spot_id, hour desc`);
  const bySpot = new Map(latest.rows.map((r) => [r.spot_id, r]));
  return {
    now: Date.now(),
    role,
    unit: user.temperatureUnit,
    spots: spots.map((s) => ({ ...s, latest: bySpot.get(s.id) ?? null })),
  };
}

export default function SiteSpots({ loaderData, params }: Route.ComponentProps) {
  const { spots, role, unit } = loaderData;
  const now = useNow(loaderData.now);
  return (
    <section>
      <div className="mb-4 flex items-center justify-between gap-4">
        <p className="text-muted">{spots.length === 0 ? "No spots yet." : "The places you are measuring."}</p>
        {role === "owner" ? (
          <Link to={`/sites/${params.siteId}/spots/new`} className="btn">
            Add a spot
          </Link>
        ) : null}
      </div>
      <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {spots.map((s) => (
          <li key={s.id}>
            <Link to={`/sites/${params.siteId}/spots/${s.id}`} className="card block h-full hover:border-accent/50">
              <div className="flex items-start justify-between gap-3">
                <p className="text-lg font-semibold">{s.name}</p>
                <span className="rounded-full bg-paper px-2 py-0.5 text-xs font-medium text-muted">
                  {s.indoor ? "indoors" : "outdoors"}
                  {s.facing !== "none" ? ` · faces ${s.facing}` : ""}
                </span>
              </div>
              {s.latest ? (
                <p className="mt-3 text-2xl font-semibold tabular-nums">
                  {s.latest.t != null ? formatTemp(s.latest.t, unit) : "–"}
                  <span className="ml-3 text-base font-normal text-muted">
                    {s.latest.h != null ? `${Math.round(s.latest.h)} % RH` : ""}
                  </span>
                </p>
              ) : (
                <p className="mt-3 text-sm text-muted">No readings yet — place a sensor here.</p>
              )}
              <p className="mt-2 text-sm text-muted">
                {s.capacity > 0 ? `Room for ${s.capacity} pots` : "Capacity not set"}
                {s.latest
                  ? now - new Date(s.latest.hour).getTime() < 3_600_000
                    ? " · average so far this hour"
                    : ` · nothing heard for ${timeAgo(new Date(new Date(s.latest.hour).getTime() + 3_600_000), now).replace(" ago", "")}`
                  : ""}
              </p>
            </Link>
          </li>
        ))}
      </ul>
    </section>
  );
}
