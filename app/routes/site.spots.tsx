import { Link } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { getSite } from "~/.server/sites";
import { siteMap } from "~/.server/site-map";
import { useNow } from "~/components/use-now";
import { SpotCard, WhereMatrix } from "~/components/spot-card";
import { VerdictKey } from "~/components/verdict-mark";
import { SpotsAndSeasons } from "~/components/illustration";
import { periodLabel } from "~/domain/season/period";
import type { Route } from "./+types/site.spots";

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const site = await getSite(siteId);
  const { cards, matrix } = await siteMap(site, user.temperatureUnit);
  return { now: Date.now(), role, unit: user.temperatureUnit, cards, matrix };
}

export default function SiteSpots({ loaderData, params }: Route.ComponentProps) {
  const { cards, matrix, role, unit } = loaderData;
  const now = useNow(loaderData.now);
  const siteId = Number(params.siteId);
  return (
    <div className="space-y-8">
      <section aria-labelledby="where-heading" className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="where-heading" className="text-title font-semibold">
              Where what grows
            </h2>
            <p className="text-sm text-muted">
              {cards.length === 0
                ? "No spots yet: add the places you want to measure."
                : "Each spot judged on its latest twelve months of readings, for the plants you grow and want first."}
            </p>
          </div>
          {role === "owner" ? (
            <Link to={`/sites/${params.siteId}/spots/new`} className="btn">
              Add a spot
            </Link>
          ) : null}
        </div>
        {cards.length === 0 ? <SpotsAndSeasons className="mx-auto h-auto w-full max-w-md py-4" /> : null}
        {matrix.length ? (
          <div className="niche space-y-3">
            <VerdictKey />
            <WhereMatrix rows={matrix} spots={cards.map((c) => ({ id: c.id, name: c.name }))} siteId={siteId} />
          </div>
        ) : null}
      </section>

      <section aria-labelledby="spots-heading">
        <h2 id="spots-heading" className="text-title font-semibold">
          The spots
        </h2>
        <p className="mb-3 text-sm text-muted">
          Each spot's year in a small strip: a line from the month's lowest to its highest, a bar from the mean daily
          low to the mean daily high, coloured from cold (blue) to warm (orange). Faded months have too few days of
          readings.
        </p>
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
          {cards.map((c) => (
            <li key={c.id}>
              <SpotCard spot={c} siteId={siteId} unit={unit} now={now} periodText={periodLabel(c.period)} />
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
