// GET /api/sites/:siteId/spots/:spotId/export?what=raw|hourly|profile&format=csv|json&from=YYYY-MM-DD&to=YYYY-MM-DD
// Streamed from PostgreSQL; see app/.server/exports.ts.
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { exportProfile, exportReadings, parsePeriod } from "~/.server/exports";
import { getSite } from "~/.server/sites";
import { getSpot } from "~/.server/spots";
import type { Route } from "./+types/api.export";

const WHAT = ["raw", "hourly", "profile"] as const;
const FORMATS = ["csv", "json"] as const;

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  const q = new URL(request.url).searchParams;
  const what = q.get("what") ?? "hourly";
  const format = q.get("format") ?? "csv";
  const bad = (error: string) => Response.json({ error }, { status: 400 });
  if (!(WHAT as readonly string[]).includes(what)) return bad(`what is one of ${WHAT.join(", ")}`);
  if (!(FORMATS as readonly string[]).includes(format)) return bad(`format is one of ${FORMATS.join(", ")}`);
  const period = parsePeriod(q, site.timeZone);
  if ("error" in period) return bad(period.error!);
  const f = format as (typeof FORMATS)[number];
  const body =
    what === "profile"
      ? await exportProfile({ spot, site, format: f, from: period.from, to: period.to })
      : exportReadings({ spot, site, kind: what as "raw" | "hourly", format: f, from: period.from, to: period.to });
  const day = (d: Date) => d.toISOString().slice(0, 10);
  const slug =
    spot.name
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-|-$/g, "") || `spot-${spot.id}`;
  const filename = `nichewise-${slug}-${what}-${day(period.from)}-to-${day(new Date(period.to.getTime() - 1))}.${f}`;
  return new Response(body, {
    headers: {
      "Content-Type": f === "csv" ? "text/csv; charset=utf-8" : "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="${filename}"`,
      "Cache-Control": "private, no-store",
    },
  });
}
