import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { alertBanner } from "~/.server/alerts/pages";
import type { Route } from "./+types/api.alerts";

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  return Response.json(await alertBanner(siteId), { headers: { "Cache-Control": "no-store" } });
}
