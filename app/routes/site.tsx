import { useEffect, useRef } from "react";
import { NavLink, Outlet, useLocation } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { getSite } from "~/.server/sites";
import { alertBanner } from "~/.server/alerts/queries";
import { AlertBanner } from "~/components/alert-banner";
import type { Route } from "./+types/site";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.site.name ?? "Site"} · Nichewise` }];

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
  // On a phone the tabs scroll sideways: keep the current one in view.
  const navRef = useRef<HTMLElement>(null);
  const location = useLocation();
  useEffect(() => {
    navRef.current?.querySelector<HTMLElement>("[aria-current=page]")?.scrollIntoView({ block: "nearest", inline: "center" });
  }, [location.pathname]);
  const { site, role } = loaderData;
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
    ...(role === "owner" ? [{ to: `${base}/edit`, label: "Site details" }] : []),
  ];
  return (
    <main className="mx-auto max-w-6xl px-4 pt-6 pb-16 sm:px-6">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1 className="h1">{site.name}</h1>
        <p className="text-sm text-muted">{roleNote[role]}</p>
      </div>
      <nav ref={navRef} aria-label="Site" className="-mx-4 mt-4 mb-6 flex gap-1 overflow-x-auto border-b border-line px-4 sm:mx-0 sm:px-0">
        {tabs.map((t) => (
          <NavLink
            key={t.to}
            to={t.to}
            end={t.end}
            className="shrink-0 border-b-2 border-transparent px-3 py-2.5 text-sm font-medium text-muted hover:text-ink aria-[current=page]:border-accent aria-[current=page]:text-ink"
          >
            {t.label}
          </NavLink>
        ))}
      </nav>
      <AlertBanner siteId={site.id} initial={loaderData.alerts} unit={loaderData.unit} />
      <Outlet />
    </main>
  );
}
