import { Link, Outlet, useLocation, useRouteLoaderData } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { getSite } from "~/.server/sites";
import { alertBanner } from "~/.server/alerts/pages";
import { AlertBanner } from "~/components/alert-banner";
import { describeRouteError, RouteError } from "~/components/route-error";
import type { Route } from "./+types/site";

export const meta: Route.MetaFunction = ({ data, error }) => [
  { title: `${error ? `${describeRouteError(error).title} · ` : ""}${data?.site.name ?? "Site"} · Nichewise` },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  return { site: await getSite(siteId), role, unit: user.temperatureUnit, alerts: await alertBanner(siteId) };
}

const roleNote = {
  owner: "Owner",
  carer: "Carer — you can log water checks, move sensors and plants, and acknowledge alerts",
  mentor: "Mentor — you can read everything here and leave notes",
};

export default function SiteLayout({ loaderData }: Route.ComponentProps) {
  return (
    <SiteFrame data={loaderData}>
      <AlertBanner siteId={loaderData.site.id} initial={loaderData.alerts} unit={loaderData.unit} />
      <Outlet />
    </SiteFrame>
  );
}

/**
 * A page of the site that failed (a spot id that is not there, a server error) keeps the site's name
 * and menu around its error; a site that did not load (not a member) shows the error alone.
 */
export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const data = useRouteLoaderData<typeof loader>("routes/site");
  if (!data) {
    return (
      <main className="mx-auto max-w-xl px-5 py-16">
        <RouteError error={error} />
      </main>
    );
  }
  return (
    <SiteFrame data={data}>
      <RouteError error={error} level={2} home={`/sites/${data.site.id}`} />
    </SiteFrame>
  );
}

function SiteFrame({
  data,
  children,
}: {
  data: Pick<Route.ComponentProps["loaderData"], "site" | "role">;
  children: React.ReactNode;
}) {
  const location = useLocation();
  const { site, role } = data;
  const base = `/sites/${site.id}`;
  const tabs = [
    { to: base, label: "Spots", end: true },
    { to: `${base}/sensors`, label: "Sensors" },
    { to: `${base}/compare`, label: "Compare" },
    { to: `${base}/plants`, label: "Plants" },
    { to: `${base}/wishlist`, label: "Wishlist" },
    ...(role !== "mentor" ? [{ to: `${base}/import`, label: "Import CSV" }] : []),
    { to: `${base}/water`, label: "Water" },
    { to: `${base}/alerts`, label: "Alerts" },
    { to: `${base}/members`, label: "People" },
    { to: `${base}/broker`, label: "Home broker" },
    ...(role === "owner" ? [{ to: `${base}/edit`, label: "Site details" }] : []),
  ];
  // The section you are in: the tab whose address starts this page's. A spot's pages belong to Spots,
  // except its alert watches, which belong to Alerts (the site's alerts page links to them).
  const spotWatches = new RegExp(`^${base}/spots/[^/]+/alerts/?$`).test(location.pathname);
  const current = spotWatches
    ? tabs.find((t) => t.to === `${base}/alerts`)
    : (tabs
        .filter((t) =>
          t.end ? location.pathname === t.to : location.pathname === t.to || location.pathname.startsWith(`${t.to}/`),
        )
        .sort((a, b) => b.to.length - a.to.length)[0] ??
      (location.pathname.startsWith(`${base}/spots`) ? tabs[0] : undefined));
  // The tab's own page is the current page; a page under it (a spot of Spots) is its current location.
  const here = (t: (typeof tabs)[number]) =>
    t === current
      ? { "data-here": "", "aria-current": location.pathname === t.to ? ("page" as const) : ("location" as const) }
      : {};
  return (
    <main className="mx-auto max-w-6xl px-4 pt-6 pb-16 sm:px-6">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="h1">{site.name}</h1>
        <p className="text-sm text-muted">{roleNote[role]}</p>
      </div>
      <nav aria-label="Site" className="mt-4 mb-6">
        {/* A phone gets a menu that names the section you are in (closed again after each move);
            a wider screen gets every tab, wrapping rather than scrolling out of sight. */}
        <details key={location.pathname} className="group sm:hidden" data-testid="site-menu">
          <summary
            className={
              "flex cursor-pointer items-center justify-between gap-3 " +
              "rounded-t-[1.1rem] rounded-b-[0.2rem] border border-b-[3px] " +
              "border-stone-line bg-card px-4 py-3"
            }
          >
            <span>
              <span className="eyebrow block">Section</span>
              <span className="font-semibold">{current?.label ?? "Choose a section"}</span>
            </span>
            <span className="text-sm text-muted">
              all {tabs.length} sections{" "}
              <span aria-hidden="true" className="inline-block transition-transform group-open:rotate-180">
                ▾
              </span>
            </span>
          </summary>
          <ul className="mt-1 grid grid-cols-2 gap-1 rounded-[0.2rem] border border-stone-line bg-card p-2">
            {tabs.map((t) => (
              <li key={t.to}>
                <Link
                  to={t.to}
                  {...here(t)}
                  className="block rounded-t-[0.8rem] rounded-b-[0.2rem] px-3 py-2.5 text-sm font-medium data-[here]:bg-stone data-[here]:font-semibold"
                >
                  {t.label}
                </Link>
              </li>
            ))}
          </ul>
        </details>
        <ul className="hidden flex-wrap gap-x-1 border-b-2 border-stone-line sm:flex">
          {tabs.map((t) => (
            <li key={t.to}>
              <Link
                to={t.to}
                {...here(t)}
                className={
                  "-mb-0.5 block rounded-t-[1.1rem] border-2 border-transparent " +
                  "px-3.5 pt-2.5 pb-2 text-sm font-medium text-muted " +
                  "hover:text-ink data-[here]:border-stone-line " +
                  "data-[here]:border-b-card data-[here]:bg-card " +
                  "data-[here]:font-semibold data-[here]:text-ink"
                }
              >
                {t.label}
              </Link>
            </li>
          ))}
        </ul>
      </nav>
      {children}
    </main>
  );
}
