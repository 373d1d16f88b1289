// Spots: listing and finding a site's spots, and adding, changing and deleting one. Each change is one transaction with its audit row; the
// sensor cache (which knows whether a sensor's spot is indoor or outdoor, for ingest's plausibility
// limits) forgets the spot's sensors once the change is committed, and a spot that becomes outdoor
// gets the cold watch its plants call for, in the same transaction.
import { and, asc, eq, isNull } from "drizzle-orm";
import { notFound } from "~/.server/auth";
import { db, type Tx } from "~/.server/db";
import { cleanText, paramId } from "~/.server/ids";
import { invalidateSensorCache } from "~/.server/ingest/sensor-cache";
import { ensureColdWatch } from "~/.server/watches";
import { auditLog, placements, spots, type Spot } from "~/db/schema.server";
import type { Glazing, LightSource, SpotFacing } from "~/domain/vocabulary";

export async function listSpots(siteId: number) {
  return db().select().from(spots).where(eq(spots.siteId, siteId)).orderBy(asc(spots.name));
}

/** The spot, if it belongs to the site in the URL; otherwise a 404. */
export async function getSpot(siteId: number, spotId: number | string | undefined) {
  const id = paramId(spotId);
  const [spot] = await db()
    .select()
    .from(spots)
    .where(and(eq(spots.id, id), eq(spots.siteId, siteId)));
  if (!spot) notFound();
  return spot;
}

/**
 * `lightSource` (default sun) sets the lux → PPFD factor of the spot's DLI; `glazing` is kept only
 * for a spot by a window (facing not "none"), else stored as not given. Both left out: unchanged.
 */
export type SpotValues = {
  name: string;
  indoor: boolean;
  facing: SpotFacing;
  capacity: number;
  notes: string;
  lightSource?: LightSource;
  glazing?: Glazing | null;
};

const FIELDS = ["name", "indoor", "facing", "capacity", "notes", "lightSource", "glazing"] as const;

// PostgreSQL refuses NUL in text: free text loses the control characters nobody types.
const clean = (v: SpotValues): SpotValues => ({
  ...v,
  name: cleanText(v.name).trim() || "Unnamed spot",
  notes: cleanText(v.notes),
  ...(v.glazing !== undefined ? { glazing: v.facing === "none" ? null : v.glazing } : {}),
});

export async function createSpot(opts: { siteId: number; actorId: number; values: SpotValues }) {
  return db().transaction(async (tx) => {
    const [spot] = await tx
      .insert(spots)
      .values({ siteId: opts.siteId, ...clean(opts.values) })
      .returning();
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "spot.create",
      detail: { spotId: spot.id, name: spot.name },
    });
    return spot;
  });
}

export async function updateSpot(opts: { siteId: number; actorId: number; spot: Spot; values: SpotValues }) {
  const { spot } = opts;
  const values = clean(opts.values);
  const changes: Record<string, [unknown, unknown]> = {};
  for (const k of FIELDS)
    if (values[k] !== undefined && spot[k] !== values[k])
      changes[k] = [k === "notes" ? spot[k].length : spot[k], k === "notes" ? values[k].length : values[k]];
  const sensorIds = await db().transaction(async (tx) => {
    const [updated] = await tx
      .update(spots)
      .set(values)
      .where(and(eq(spots.id, spot.id), eq(spots.siteId, opts.siteId)))
      .returning({ id: spots.id });
    if (!updated) return null;
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "spot.update",
      detail: { spotId: spot.id, name: values.name, changes },
    });
    if (spot.indoor && !values.indoor)
      await ensureColdWatch({ siteId: opts.siteId, spotId: spot.id, actorId: opts.actorId }, tx);
    return "indoor" in changes ? await placedSensors(tx, spot.id) : [];
  });
  for (const id of sensorIds ?? []) invalidateSensorCache(id);
  return { updated: sensorIds !== null, changes };
}

export async function deleteSpot(opts: { siteId: number; actorId: number; spot: Spot }) {
  const sensorIds = await db().transaction(async (tx) => {
    const sensorIds = await placedSensors(tx, opts.spot.id);
    const [gone] = await tx
      .delete(spots)
      .where(and(eq(spots.id, opts.spot.id), eq(spots.siteId, opts.siteId)))
      .returning({ id: spots.id });
    if (!gone) return null;
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "spot.delete",
      detail: { spotId: opts.spot.id, name: opts.spot.name },
    });
    return sensorIds;
  });
  // Their placements went with the spot: ingest must stop treating them as placed there.
  for (const id of sensorIds ?? []) invalidateSensorCache(id);
  return sensorIds !== null;
}

async function placedSensors(tx: Tx, spotId: number) {
  const rows = await tx
    .select({ id: placements.sensorId })
    .from(placements)
    .where(and(eq(placements.spotId, spotId), isNull(placements.toAt)));
  return rows.map((r) => r.id);
}
