// Sites: the ones a user belongs to, and one by id. Callers have checked the role already. A
// site's spots, sensors, placements and members have their own modules (spots.ts,
// sensors.server.ts, placements.ts, members.ts), where every lookup by id also checks that the row
// belongs to the site in the URL, so an id from another site is a 404.
import { asc, eq, sql } from "drizzle-orm";
import { notFound } from "~/.server/auth";
import { db } from "~/.server/db";
import { memberships, sites, spots } from "~/db/schema.server";

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
