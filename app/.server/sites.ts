// Queries about sites, spots and sensors. Callers have checked the role already; every lookup by id
// also checks that the row belongs to the site in the URL, so an id from another site is a 404.
import { and, asc, desc, eq, isNull, sql } from "drizzle-orm";
import { notFound } from "~/.server/auth";
import { db } from "~/.server/db";
import { paramId } from "~/.server/ids";
import { memberships, placements, sensors, sites, spots, users } from "~/db/schema.server";

export async function mySites(userId: number) {
  return db()
    .select({
      id: sites.id,
      name: sites.name,
      timeZone: sites.timeZone,
      role: memberships.role,
      spotCount: sql<number>`(select count(*)::int from ${spots} where ${spots.siteId} = ${sites.id})`,
    })
    .from(memberships)
    .innerJoin(sites, eq(sites.id, memberships.siteId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(sites.name));
}

export async function getSite(siteId: number) {
  const [site] = await db().select().from(sites).where(eq(sites.id, siteId));
  if (!site) notFound();
  return site;
}

export async function listSpots(siteId: number) {
  return db().select().from(spots).where(eq(spots.siteId, siteId)).orderBy(asc(spots.name));
}

export async function getSpot(siteId: number, spotId: number | string | undefined) {
  const id = paramId(spotId);
  const [spot] = await db().select().from(spots).where(and(eq(spots.id, id), eq(spots.siteId, siteId)));
  if (!spot) notFound();
  return spot;
}

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

export async function getSensor(siteId: number, sensorId: number | string | undefined) {
  const id = paramId(sensorId);
  const [sensor] = await db().select().from(sensors).where(and(eq(sensors.id, id), eq(sensors.siteId, siteId)));
  if (!sensor) notFound();
  return sensor;
}

export async function placementHistory(where: { sensorId?: number; spotId?: number }) {
  const cond = where.sensorId ? eq(placements.sensorId, where.sensorId) : eq(placements.spotId, where.spotId!);
  return db()
    .select({
      id: placements.id,
      sensorId: placements.sensorId,
      sensorName: sensors.name,
      spotId: placements.spotId,
      spotName: spots.name,
      fromAt: placements.fromAt,
      toAt: placements.toAt,
    })
    .from(placements)
    .innerJoin(sensors, eq(sensors.id, placements.sensorId))
    .innerJoin(spots, eq(spots.id, placements.spotId))
    .where(cond)
    .orderBy(desc(placements.fromAt));
}

export async function listMembers(siteId: number) {
  return db()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, since: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.siteId, siteId))
    .orderBy(asc(memberships.role), asc(users.name));
}
