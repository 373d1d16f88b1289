// The site's home: where what grows. Each spot's judged year (the same cached rollups and fits the
// spot page uses), its best groups, the plants standing there, open alerts and open notes, and a
// matrix of spots × the groups the grower cares about (wishlist and placed plants first).
import { sql } from "drizzle-orm";
import { db } from "~/.server/db";
import { fitsFor, judgedPeriods, parseGlazing, spotProfiles, windowOf, glassContextFor } from "~/.server/profiles";
import { siteInventory, siteWishlist, sitePlants } from "~/.server/plants";
import { listSpots } from "~/.server/spots";
import { siteEvents } from "~/.server/alerts/pages";
import { listNotes } from "~/.server/notes";
import { GLAZING_U } from "~/domain/climate/glass";
import type { GlassContext } from "~/domain/fit/cold-glass";
import { VERDICT_ORDER } from "~/domain/fit/verdict";
import type { Site } from "~/db/schema.server";
import type { TempUnit } from "~/domain/units";

/** How many groups the matrix shows at most: the grower's own first, then the best of the rest. */
export const MATRIX_ROWS = 10;

export type MatrixRow = {
  key: string;
  name: string;
  why: "wished" | "growing" | "fits";
  cells: { spotId: number; verdict: string; reason: string | null }[];
};

export async function siteMap(site: Site, unit: TempUnit, now = new Date()) {
  const spots = await listSpots(site.id);
  const ids = spots.map((s) => s.id);
  const [plants, wishes, inventory, open, notes, latest, periods] = await Promise.all([
    sitePlants(site.id),
    siteWishlist(site.id),
    siteInventory(site.id),
    siteEvents(site.id, { openOnly: true, limit: 50 }),
    listNotes(site.id),
    // The newest hour of each spot, from the rollups: a detail on the card, not its headline.
    db().execute<{ spot_id: number; hour: string; t: number | null; h: number | null }>(sql`
      select distinct on (spot_id) spot_id, hour, t_sum / nullif(t_n, 0) as t, h_sum / nullif(h_n, 0) as h
      from hourly_rollups where spot_id in (select id from spots where site_id = ${site.id})
      order by spot_id, hour desc`),
    judgedPeriods(site, ids, { kind: "latest" }, now),
  ]);
  const profiles = await spotProfiles(site, ids, now, { periods, plants });
  const outdoor = spots.find((s) => !s.indoor);
  const format = { unit };
  const fitsBySpot = new Map<number, ReturnType<typeof fitsFor>>();
  for (const spot of spots) {
    const season = profiles.get(spot.id)!;
    const glazing = parseGlazing(spot.glazing);
    let glass: GlassContext | undefined;
    if (glazing && spot.indoor && spot.facing !== "none" && outdoor) {
      // The outdoor spot's profile is already here when both are judged on the same period.
      const a = periods.get(spot.id),
        b = periods.get(outdoor.id);
      if (a && b && a.from.getTime() === b.from.getTime() && a.to.getTime() === b.to.getTime()) {
        const lows = new Map<number, number>(
          profiles
            .get(outdoor.id)!
            .year.filter((m) => m.temperature.meanDailyLow !== null)
            .map((m) => [m.month, m.temperature.meanDailyLow!] as const),
        );
        glass = lows.size > 0 ? { uValue: GLAZING_U[glazing], outdoorLowByMonth: lows } : undefined;
      } else glass = await glassContextFor(site, spot, spots, a!, glazing, now);
    }
    fitsBySpot.set(spot.id, fitsFor(season, plants, { window: windowOf(site, spot), glass }, format));
  }
  const byKey = new Map(plants.map((p) => [p.key, p]));
  const live = new Map(latest.rows.map((r) => [r.spot_id, r]));

  const cards = spots.map((spot) => {
    const fits = fitsBySpot.get(spot.id)!;
    const season = profiles.get(spot.id)!;
    const period = periods.get(spot.id)!;
    const verdicts = new Map(fits.map((f) => [f.key, f]));
    const standing = inventory.filter((i) => i.spotId === spot.id);
    // "Grows best here" names only groups judged to grow; those not judged yet are counted apart.
    const top = fits.filter((f) => f.verdict !== "struggles here" && f.verdict !== "not enough data yet").slice(0, 3);
    const pending = fits.filter((f) => f.verdict === "not enough data yet").length;
    const r = live.get(spot.id);
    return {
      id: spot.id,
      name: spot.name,
      indoor: spot.indoor,
      facing: spot.facing,
      capacity: spot.capacity,
      period: { firstMonth: period.firstMonth, lastMonth: period.lastMonth, toToday: period.toToday },
      days: season.year.reduce((n, m) => n + m.coverage.daysObserved, 0),
      year: season.year.map((m) => ({
        key: m.key,
        name: m.name,
        lowest: m.temperature.lowest,
        highest: m.temperature.highest,
        meanDailyLow: m.temperature.meanDailyLow,
        meanDailyHigh: m.temperature.meanDailyHigh,
        enough: m.coverage.enough,
      })),
      pending,
      best: top.map((f) => ({ key: f.key, name: f.name, verdict: f.verdict, reason: f.reasons[0]?.message ?? null })),
      standing: standing.map((s) => ({
        id: s.id,
        name: s.nickname || byKey.get(s.plantKey)?.name || s.plantKey,
        plant: byKey.get(s.plantKey)?.name ?? `${s.plantKey} (profile removed)`,
        pots: s.pots,
        verdict: verdicts.get(s.plantKey)?.verdict ?? null,
      })),
      alerts: open
        .filter((e) => e.spotId === spot.id)
        .map((e) => ({ id: e.id, kind: e.kind, acknowledged: e.acknowledgedBy !== null })),
      openNotes: notes.filter((n) => n.spotId === spot.id && n.resolvedAt === null).length,
      latest: r ? { hour: new Date(r.hour).toISOString(), t: r.t, h: r.h } : null,
    };
  });

  // The groups the grower cares about: wished for, then standing somewhere, then those that thrive
  // (or do with care) in some spot, best first, up to MATRIX_ROWS.
  const rows: { key: string; why: MatrixRow["why"] }[] = [];
  const add = (key: string, why: MatrixRow["why"]) => {
    if (byKey.has(key) && !rows.some((r) => r.key === key)) rows.push({ key, why });
  };
  for (const w of wishes) add(w.plantKey, "wished");
  for (const i of inventory) add(i.plantKey, "growing");
  const bestAnywhere = plants
    .map((p) => ({
      key: p.key,
      rank: Math.min(
        ...spots.map((s) =>
          VERDICT_ORDER.indexOf(fitsBySpot.get(s.id)!.find((f) => f.key === p.key)?.verdict ?? "struggles here"),
        ),
      ),
    }))
    // "Does well somewhere": judged to grow (not merely not ruled out yet) in at least one spot.
    .filter((p) => p.rank < VERDICT_ORDER.indexOf("not enough data yet"))
    .sort((a, b) => a.rank - b.rank);
  for (const p of bestAnywhere) if (rows.length < MATRIX_ROWS) add(p.key, "fits");
  const matrix: MatrixRow[] = rows.map(({ key, why }) => ({
    key,
    name: byKey.get(key)!.name,
    why,
    cells: spots.map((s) => {
      const f = fitsBySpot.get(s.id)!.find((x) => x.key === key);
      return { spotId: s.id, verdict: f?.verdict ?? "not enough data yet", reason: f?.reasons[0]?.message ?? null };
    }),
  }));
  return { cards, matrix };
}
