// Who hears of a site's alerts: every member, with the kinds and quiet hours they chose, or their
// role's defaults when they never chose. Read by the notifier for each letter it posts.
import { and, asc, eq } from "drizzle-orm";
import { db, type Queryable } from "~/.server/db";
import { alertPreferences, memberships, users, type Role } from "~/db/schema.server";
import { ALERT_KINDS } from "~/domain/alerts/rules";

export type Recipient = {
  userId: number;
  email: string;
  unit: "C" | "F";
  wantsEmail: boolean;
  kinds: string[];
  quietFrom: number | null;
  quietTo: number | null;
};

/**
 * What a member who never chose gets by e-mail. Owners and carers look after the plants, so they
 * get every kind; a mentor advises from afar and hears of cold snaps and silent sensors only when
 * they tick them (the alerts page's e-mail settings): otherwise a mentor far away is woken for a
 * frost nobody asked them to act on.
 */
export function defaultKinds(role: Role): string[] {
  return role === "mentor" ? ALERT_KINDS.filter((k) => k !== "cold" && k !== "silent") : ALERT_KINDS;
}

/** Every member of the site with their alert preferences (defaults for their role when they never saved any). */
export async function siteRecipients(siteId: number, q: Queryable = db()): Promise<Recipient[]> {
  const rows = await q
    .select({
      userId: users.id,
      email: users.email,
      unit: users.temperatureUnit,
      role: memberships.role,
      wants: alertPreferences.email,
      kinds: alertPreferences.kinds,
      quietFrom: alertPreferences.quietFrom,
      quietTo: alertPreferences.quietTo,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .leftJoin(
      alertPreferences,
      and(eq(alertPreferences.userId, memberships.userId), eq(alertPreferences.siteId, memberships.siteId)),
    )
    .where(eq(memberships.siteId, siteId))
    .orderBy(asc(users.id));
  return rows.map((r) => ({
    userId: r.userId,
    email: r.email,
    unit: r.unit,
    wantsEmail: r.wants ?? true,
    kinds: r.kinds ?? defaultKinds(r.role),
    quietFrom: r.quietFrom,
    quietTo: r.quietTo,
  }));
}
