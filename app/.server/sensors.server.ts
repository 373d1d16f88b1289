// Sensors: listing and finding a site's sensors, and the sensor's own writes (adding, saving,
// re-keying, deleting). Where a sensor was when lives in placements.ts. Each change is one function
// and one transaction, with its audit row and the rebuild of every affected spot's rollups inside
// it. The ingest cache is invalidated and the broker told after COMMIT: invalidated earlier, a
// lookup between the two could cache the old placement again.
import { and, asc, eq, isNull } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import type pg from "pg";
import { notFound } from "~/.server/auth";
import { db, pool } from "~/.server/db";
import { paramId } from "~/.server/ids";
import { runningBroker } from "~/.server/ingest/broker";
import { rebuildRollupsIn } from "~/.server/rollups/rebuild";
import { invalidateSensorCache } from "~/.server/ingest/sensor-cache";
import { hashSensorSecret, newSensorSecret } from "~/.server/secrets";
import * as schema from "~/db/schema.server";
import { auditLog, placements, sensors, spots, type Calibration, type Channel } from "~/db/schema.server";
import { FROM_FIRST_READING } from "~/lib/placements";

/** A change the grower asked for that cannot be made; the message says why and what to do. */
export class PlacementError extends Error {}

export type Tx = ReturnType<typeof drizzleOn>;
const drizzleOn = (client: pg.PoolClient) => drizzle(client, { schema, casing: "snake_case" });

/** Runs `fn` in one transaction; `tx` (Drizzle) and `client` (plain SQL) share it. */
export async function inTransaction<T>(fn: (tx: Tx, client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = await pool().connect();
  try {
    await client.query("BEGIN");
    const result = await fn(drizzleOn(client), client);
    await client.query("COMMIT");
    return result;
  } catch (err) {
    await client.query("ROLLBACK").catch(() => {});
    throw err;
  } finally {
    client.release();
  }
}

/** Serialises changes to one sensor's placements (a move racing an edit would overlap them). */
export const lockSensor = (client: pg.PoolClient, sensorId: number) =>
  client.query("SELECT pg_advisory_xact_lock(7001, $1)", [sensorId]);

export const audit = (
  tx: Tx,
  siteId: number,
  actorId: number | null,
  action: string,
  detail: Record<string, unknown>,
) => tx.insert(auditLog).values({ siteId, actorId, action, detail });

export async function spotInSite(tx: Tx, siteId: number, spotId: number) {
  const [spot] = await tx
    .select({ id: spots.id })
    .from(spots)
    .where(and(eq(spots.id, spotId), eq(spots.siteId, siteId)));
  if (!spot) throw new PlacementError("That spot is not in this site.");
}

/** How a new sensor's first placement starts: from its first reading, from now, or from a time. */
export type PlacedSince = "first" | "now" | Date;

// ---------------------------------------------------------------------------------------------
// The sensor itself

export async function listSensors(siteId: number) {
  return db()
    .select({
      id: sensors.id,
      name: sensors.name,
      channels: sensors.channels,
      lastSeenAt: sensors.lastSeenAt,
      battery: sensors.battery,
      rejectedCount: sensors.rejectedCount,
      spotId: placements.spotId,
      spotName: spots.name,
    })
    .from(sensors)
    .leftJoin(placements, and(eq(placements.sensorId, sensors.id), isNull(placements.toAt)))
    .leftJoin(spots, eq(spots.id, placements.spotId))
    .where(eq(sensors.siteId, siteId))
    .orderBy(asc(sensors.name));
}

/** The sensor, if it belongs to the site in the URL; otherwise a 404. */
export async function getSensor(siteId: number, sensorId: number | string | undefined) {
  const id = paramId(sensorId);
  const [sensor] = await db()
    .select()
    .from(sensors)
    .where(and(eq(sensors.id, id), eq(sensors.siteId, siteId)));
  if (!sensor) notFound();
  return sensor;
}

export async function createSensor(opts: {
  siteId: number;
  name: string;
  channels: Channel[];
  spotId?: number;
  since?: PlacedSince;
  actorId: number | null;
}) {
  const secret = newSensorSecret();
  const now = new Date();
  const since = opts.since ?? "first";
  const fromAt = since === "first" ? FROM_FIRST_READING : since === "now" ? now : since;
  if (fromAt.getTime() > now.getTime() + 60_000) throw new PlacementError("That time is in the future.");
  const id = await inTransaction(async (tx) => {
    if (opts.spotId) await spotInSite(tx, opts.siteId, opts.spotId);
    const [sensor] = await tx
      .insert(sensors)
      .values({ siteId: opts.siteId, name: opts.name, channels: opts.channels, secretHash: hashSensorSecret(secret) })
      .returning({ id: sensors.id });
    await audit(tx, opts.siteId, opts.actorId, "sensor.create", { sensorId: sensor.id, name: opts.name });
    if (opts.spotId) {
      // A new sensor has no readings yet, so no rollup changes.
      await tx.insert(placements).values({ sensorId: sensor.id, spotId: opts.spotId, fromAt });
      await audit(tx, opts.siteId, opts.actorId, "sensor.place", {
        sensorId: sensor.id,
        spotId: opts.spotId,
        at: since === "first" ? "first reading" : fromAt.toISOString(),
        from: null,
      });
    }
    return sensor.id;
  });
  invalidateSensorCache(id);
  return { id, secret };
}

/** Renames and recalibrates; a changed calibration rebuilds every spot the sensor has been in. */
export async function saveSensor(opts: {
  siteId: number;
  sensorId: number;
  name: string;
  calibration: Calibration;
  actorId: number | null;
}) {
  const { sensorId, calibration } = opts;
  await inTransaction(async (tx, client) => {
    const [before] = await tx
      .select({ calibration: sensors.calibration })
      .from(sensors)
      .where(eq(sensors.id, sensorId))
      .for("update");
    if (!before) throw new PlacementError("That sensor no longer exists.");
    await tx.update(sensors).set({ name: opts.name, calibration }).where(eq(sensors.id, sensorId));
    await audit(tx, opts.siteId, opts.actorId, "sensor.update", { sensorId, name: opts.name, calibration });
    if (JSON.stringify(calibration) !== JSON.stringify(before.calibration))
      await rebuildRollupsIn(client, await spotsOf(tx, sensorId));
  });
  invalidateSensorCache(sensorId);
}

/** A new secret: the old one stops working at once and its connection is closed. */
export async function rotateSensorSecret(opts: { siteId: number; sensorId: number; actorId: number | null }) {
  const secret = newSensorSecret();
  await inTransaction(async (tx) => {
    await tx
      .update(sensors)
      .set({ secretHash: hashSensorSecret(secret) })
      .where(eq(sensors.id, opts.sensorId));
    await audit(tx, opts.siteId, opts.actorId, "sensor.rotate-secret", { sensorId: opts.sensorId });
  });
  invalidateSensorCache(opts.sensorId);
  runningBroker()?.disconnectSensor(opts.sensorId);
  return secret;
}

/** Deletes the sensor, its placements and its readings, and rebuilds the spots it was in. */
export async function deleteSensor(opts: { siteId: number; sensorId: number; name: string; actorId: number | null }) {
  const { sensorId } = opts;
  await inTransaction(async (tx, client) => {
    await lockSensor(client, sensorId);
    const spotIds = await spotsOf(tx, sensorId);
    await tx.delete(sensors).where(eq(sensors.id, sensorId));
    await client.query("DELETE FROM readings WHERE sensor_id = $1", [sensorId]);
    await audit(tx, opts.siteId, opts.actorId, "sensor.delete", { sensorId, name: opts.name });
    await rebuildRollupsIn(client, spotIds);
  });
  invalidateSensorCache(sensorId);
  runningBroker()?.disconnectSensor(sensorId);
}

async function spotsOf(tx: Tx, sensorId: number) {
  const rows = await tx
    .selectDistinct({ spotId: placements.spotId })
    .from(placements)
    .where(eq(placements.sensorId, sensorId));
  return rows.map((r) => r.spotId);
}
