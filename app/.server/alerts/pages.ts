// What the alert pages read and change: watches of a spot, events of a site, the banner on every
// site page, members' alert e-mail preferences. (The engine's own reads and writes: store.ts.)
import { and, desc, eq, gt, inArray, isNull, sql } from "drizzle-orm";
import { data } from "react-router";
import { notFound } from "~/.server/auth";
import { openForecastWarnings } from "~/.server/alerts/forecast";
import { defaultKinds } from "~/.server/alerts/recipients";
import { db } from "~/.server/db";
import { toId } from "~/.server/ids";
import { alertEvents, alertPreferences, watches, spots, users, type Role } from "~/db/schema.server";

/** Kind and pause of every watch of the spots, for the site's alerts page. */
export async function watchMarks(spotIds: number[]) {
  if (spotIds.length === 0) return [];
  return db()
    .select({ spotId: watches.spotId, kind: watches.kind, paused: watches.paused })
    .from(watches)
    .where(inArray(watches.spotId, spotIds));
}

export async function listRules(spotId: number) {
  return db().select().from(watches).where(eq(watches.spotId, spotId)).orderBy(watches.kind, watches.id);
}

/** The watch named by a form's ruleId: 400 when the field is malformed, 404 when not this spot's. */
export async function getRule(spotId: number, ruleId: unknown) {
  const id = toId(ruleId);
  if (id === null) throw data("Choose a watch; reload the page and try again.", { status: 400 });
  const [rule] = await db()
    .select()
    .from(watches)
    .where(and(eq(watches.id, id), eq(watches.spotId, spotId)));
  if (!rule) notFound();
  return rule;
}

export type EventRow = Awaited<ReturnType<typeof siteEvents>>[number];

export async function siteEvents(siteId: number, opts: { openOnly?: boolean; limit?: number } = {}) {
  return db()
    .select({
      id: alertEvents.id,
      kind: alertEvents.kind,
      spotId: alertEvents.spotId,
      spotName: spots.name,
      startedAt: alertEvents.startedAt,
      endedAt: alertEvents.endedAt,
      peak: alertEvents.peak,
      threshold: watches.threshold,
      acknowledgedAt: alertEvents.acknowledgedAt,
      acknowledgedBy: users.name,
      notifiedAt: alertEvents.notifiedAt,
    })
    .from(alertEvents)
    .innerJoin(spots, eq(spots.id, alertEvents.spotId))
    .innerJoin(watches, eq(watches.id, alertEvents.ruleId))
    .leftJoin(users, eq(users.id, alertEvents.acknowledgedBy))
    .where(and(eq(spots.siteId, siteId), opts.openOnly ? isNull(alertEvents.endedAt) : undefined))
    .orderBy(sql`${alertEvents.endedAt} IS NULL DESC`, desc(alertEvents.startedAt))
    .limit(opts.limit ?? 50);
}

export async function acknowledge(siteId: number, eventId: unknown, userId: number) {
  const id = toId(eventId);
  if (id === null) throw data("Choose an alert; reload the page and try again.", { status: 400 });
  const [ev] = await db()
    .select({ id: alertEvents.id, acknowledgedAt: alertEvents.acknowledgedAt })
    .from(alertEvents)
    .innerJoin(spots, eq(spots.id, alertEvents.spotId))
    .where(and(eq(alertEvents.id, id), eq(spots.siteId, siteId)));
  if (!ev) notFound();
  // The first acknowledgement stands: it records who took charge.
  if (!ev.acknowledgedAt)
    await db()
      .update(alertEvents)
      .set({ acknowledgedBy: userId, acknowledgedAt: new Date() })
      .where(eq(alertEvents.id, id));
}

/** How long an early warning stays on the banner. */
const WARNING_SHOWN_MS = 3 * 3_600_000;

/** Open events and live early warnings of a site, for the banner. */
export async function alertBanner(siteId: number, now = new Date()) {
  const open = await siteEvents(siteId, { openOnly: true, limit: 10 });
  const warned = await db()
    .select({
      ruleId: watches.id,
      kind: watches.kind,
      spotId: spots.id,
      spotName: spots.name,
      threshold: watches.threshold,
      warnedAt: watches.warnedAt,
    })
    .from(watches)
    .innerJoin(spots, eq(spots.id, watches.spotId))
    .where(
      and(
        eq(spots.siteId, siteId),
        eq(watches.paused, false),
        gt(watches.warnedAt, new Date(now.getTime() - WARNING_SHOWN_MS)),
      ),
    );
  const openRules = new Set(open.map((e) => `${e.spotId}:${e.kind}`));
  return {
    open: open.map((e) => ({
      id: e.id,
      kind: e.kind,
      spotId: e.spotId,
      spotName: e.spotName,
      startedAt: e.startedAt.toISOString(),
      peak: e.peak,
      threshold: e.threshold,
      acknowledgedBy: e.acknowledgedBy,
    })),
    warnings: warned
      .filter((w) => !openRules.has(`${w.spotId}:${w.kind}`))
      .map((w) => ({
        ruleId: w.ruleId,
        kind: w.kind,
        spotId: w.spotId,
        spotName: w.spotName,
        threshold: w.threshold,
        warnedAt: w.warnedAt!.toISOString(),
      })),
    forecast: await openForecastWarnings(siteId, now),
  };
}
export type AlertBannerData = Awaited<ReturnType<typeof alertBanner>>;

/** The member's alert e-mails for the site; defaults (defaultKinds) when they never saved any. */
export async function getPreferences(userId: number, siteId: number, role: Role) {
  const [p] = await db()
    .select()
    .from(alertPreferences)
    .where(and(eq(alertPreferences.userId, userId), eq(alertPreferences.siteId, siteId)));
  return p ?? { userId, siteId, email: true, kinds: defaultKinds(role), quietFrom: null, quietTo: null };
}

export async function savePreferences(p: {
  userId: number;
  siteId: number;
  email: boolean;
  kinds: string[];
  quietFrom: number | null;
  quietTo: number | null;
}) {
  await db()
    .insert(alertPreferences)
    .values(p)
    .onConflictDoUpdate({
      target: [alertPreferences.userId, alertPreferences.siteId],
      set: { email: p.email, kinds: p.kinds, quietFrom: p.quietFrom, quietTo: p.quietTo },
    });
}

export async function outdoorSpotIds(siteId: number) {
  return (
    await db()
      .select({ id: spots.id })
      .from(spots)
      .where(and(eq(spots.siteId, siteId), eq(spots.indoor, false)))
  ).map((s) => s.id);
}
