// The alert store's watch rows: a watch read with its spot and site, locked for an evaluation, its
// evaluation state saved, its early warning claimed and re-armed, and the silent-sensor watches with
// the instant their spot went quiet. Part of the one store (store.ts), whose Queryable every function takes.
import { and, asc, eq, getTableColumns, inArray, isNotNull, isNull, ne, sql } from "drizzle-orm";
import { db, type Queryable } from "~/.server/db";
import { placements, sensors, sites, spots, watches, type Watch } from "~/db/schema.server";

/** A watch with what its messages name: its spot and site. */
export type WatchInContext = Watch & { spotName: string; siteId: number; siteName: string; timeZone: string };

const contextColumns = {
  ...getTableColumns(watches),
  spotName: spots.name,
  siteId: spots.siteId,
  siteName: sites.name,
  timeZone: sites.timeZone,
};

const inContext = (q: Queryable) =>
  q
    .select(contextColumns)
    .from(watches)
    .innerJoin(spots, eq(spots.id, watches.spotId))
    .innerJoin(sites, eq(sites.id, spots.siteId));

const live = and(eq(watches.paused, false), ne(watches.kind, "silent"));

export async function getWatch(id: number, q: Queryable = db()): Promise<WatchInContext | undefined> {
  return (await inContext(q).where(eq(watches.id, id)))[0];
}

/** The watch under a row lock for the rest of the transaction: two evaluations never interleave on it. */
export async function lockWatch(q: Queryable, id: number): Promise<WatchInContext | undefined> {
  return (await inContext(q).where(eq(watches.id, id)).for("update", { of: watches }))[0];
}

/** Unpaused watches of the spots, in id order; silent-sensor ones too when asked. */
export function watchesOfSpots(
  spotIds: number[],
  opts: { withSilent: boolean },
  q: Queryable = db(),
): Promise<WatchInContext[]> {
  if (spotIds.length === 0) return Promise.resolve([]);
  return inContext(q)
    .where(
      and(
        inArray(watches.spotId, spotIds),
        eq(watches.paused, false),
        opts.withSilent ? undefined : ne(watches.kind, "silent"),
      ),
    )
    .orderBy(asc(watches.id));
}

/** Spots with a live watch evaluated before: after a restart they are re-read from each cursor. */
export async function evaluatedSpots(q: Queryable = db()): Promise<number[]> {
  const rows = await q
    .selectDistinct({ spotId: watches.spotId })
    .from(watches)
    .where(and(live, isNotNull(watches.evaluatedTo)));
  return rows.map((r) => r.spotId);
}

export type WatchState = {
  pendingSince: Date | null;
  clearingSince: Date | null;
  evaluatedTo: Date | null;
  clearWarning: boolean;
};

export async function saveWatchState(q: Queryable, id: number, s: WatchState) {
  const { clearWarning, ...state } = s;
  await q
    .update(watches)
    .set({ ...state, ...(clearWarning ? { warnedAt: null } : {}) })
    .where(eq(watches.id, id));
}

/** Claims the watch's early warning: whoever sets warnedAt sends it, so it goes once. */
export async function claimWarning(id: number, now: Date, q: Queryable = db()): Promise<boolean> {
  const claimed = and(eq(watches.id, id), isNull(watches.warnedAt), eq(watches.paused, false));
  return (await q.update(watches).set({ warnedAt: now }).where(claimed).returning({ id: watches.id })).length > 0;
}

/** Re-arms the early warning, unless the condition has started holding meanwhile. */
export async function rearmWarning(id: number, q: Queryable = db()) {
  await q
    .update(watches)
    .set({ warnedAt: null })
    .where(and(eq(watches.id, id), isNull(watches.pendingSince)));
}

/**
 * Unpaused silent-sensor watches with the instant their spot went quiet: the latest of a placed
 * sensor's last reading, the start of its placement and the moment that placement was made (a
 * placement dated back, or a last reading from before the sensor came here, is not silence here).
 */
export async function silentWatches(q: Queryable = db()): Promise<(WatchInContext & { quietSince: Date })[]> {
  const quiet = q
    .select({
      spotId: placements.spotId,
      quietSince: sql<string>`max(greatest(${sensors.lastSeenAt}, ${placements.fromAt}, ${placements.createdAt}))`.as(
        "quiet_since",
      ),
    })
    .from(placements)
    .innerJoin(sensors, eq(sensors.id, placements.sensorId))
    .where(isNull(placements.toAt))
    .groupBy(placements.spotId)
    .as("quiet");
  const rows = await q
    .select({ ...contextColumns, quietSince: quiet.quietSince })
    .from(watches)
    .innerJoin(spots, eq(spots.id, watches.spotId))
    .innerJoin(sites, eq(sites.id, spots.siteId))
    .innerJoin(quiet, eq(quiet.spotId, watches.spotId))
    .where(and(eq(watches.kind, "silent"), eq(watches.paused, false), isNotNull(quiet.quietSince)))
    .orderBy(asc(watches.id));
  // The aggregate comes back as the driver's text: made an instant here, once.
  return rows.map((r) => ({ ...r, quietSince: new Date(r.quietSince) }));
}
