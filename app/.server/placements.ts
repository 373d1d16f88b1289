// Moving a sensor closes its open placement and opens the next one; readings then belong to the
// spot the sensor was in at their own timestamp, so the rollups of both spots are rebuilt.
import { and, desc, eq, gt, isNull, or, sql } from "drizzle-orm";
import { db } from "~/.server/db";
import { rebuildRollups } from "~/.server/ingest/rollups";
import { auditLog, placements } from "~/db/schema.server";
import { invalidateSensorCache } from "~/.server/ingest/sensors";

export class PlacementError extends Error {}

export async function placeSensor(opts: { siteId: number; sensorId: number; spotId: number; at: Date; actorId: number | null }) {
  const { sensorId, spotId, at } = opts;
  if (at.getTime() > Date.now() + 60_000) throw new PlacementError("That time is in the future.");
  const affected = await db().transaction(async (tx) => {
    // Serialise moves of one sensor.
    await tx.execute(sql`select pg_advisory_xact_lock(7001, ${sensorId})`);
    const later = await tx
      .select()
      .from(placements)
      .where(and(eq(placements.sensorId, sensorId), or(gt(placements.fromAt, at), gt(placements.toAt, at))))
      .orderBy(desc(placements.fromAt));
    const open = later.find((p) => p.toAt === null);
    const closedAfter = later.filter((p) => p.toAt !== null);
    if (closedAfter.length > 0 || (open && open.fromAt.getTime() >= at.getTime())) {
      throw new PlacementError(
        "The sensor was already placed somewhere after that time. Choose a time after its last move.",
      );
    }
    const [current] = await tx
      .select()
      .from(placements)
      .where(and(eq(placements.sensorId, sensorId), isNull(placements.toAt)));
    if (current?.spotId === spotId) throw new PlacementError("The sensor is already in that spot.");
    if (current) await tx.update(placements).set({ toAt: at }).where(eq(placements.id, current.id));
    await tx.insert(placements).values({ sensorId, spotId, fromAt: at });
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "sensor.place",
      detail: { sensorId, spotId, at: at.toISOString(), from: current?.spotId ?? null },
    });
    return current ? [current.spotId, spotId] : [spotId];
  });
  invalidateSensorCache(sensorId);
  await rebuildRollups(affected);
}

export async function removeSensorFromSpot(opts: { siteId: number; sensorId: number; at: Date; actorId: number | null }) {
  const [current] = await db()
    .update(placements)
    .set({ toAt: opts.at })
    .where(and(eq(placements.sensorId, opts.sensorId), isNull(placements.toAt)))
    .returning();
  if (!current) return;
  await db().insert(auditLog).values({ siteId: opts.siteId, actorId: opts.actorId, action: "sensor.unplace", detail: { sensorId: opts.sensorId } });
  invalidateSensorCache(opts.sensorId);
  await rebuildRollups([current.spotId]);
}
