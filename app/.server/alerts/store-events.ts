// The alert store's events and their e-mails: an event opened, raised, closed (a silence with the
// minutes it lasted), the events whose open or all-clear is still owed, and the deliveries, one row
// per event, member and message, claimed before the e-mail goes. Part of the one store (store.ts).
import { and, asc, desc, eq, gt, isNotNull, isNull, or, sql } from "drizzle-orm";
import { db, type Queryable } from "~/.server/db";
import { alertDeliveries, alertEvents, type Watch } from "~/db/schema.server";

export type OpenEvent = { id: number; startedAt: Date; peak: number | null };
export type DeliveryMessage = (typeof alertDeliveries.$inferSelect)["message"];

export async function openEvent(watchId: number, q: Queryable = db()): Promise<OpenEvent | undefined> {
  const open = and(eq(alertEvents.ruleId, watchId), isNull(alertEvents.endedAt));
  const columns = { id: alertEvents.id, startedAt: alertEvents.startedAt, peak: alertEvents.peak };
  return (await q.select(columns).from(alertEvents).where(open).orderBy(desc(alertEvents.startedAt)).limit(1))[0];
}

export async function insertEvent(
  q: Queryable,
  w: Pick<Watch, "id" | "spotId" | "kind">,
  startedAt: Date,
  peak: number,
): Promise<number> {
  const [row] = await q
    .insert(alertEvents)
    .values({ ruleId: w.id, spotId: w.spotId, kind: w.kind, startedAt, peak })
    .returning({ id: alertEvents.id });
  return row.id;
}

export async function setEventPeak(q: Queryable, id: number, peak: number) {
  await q.update(alertEvents).set({ peak }).where(eq(alertEvents.id, id));
}

export async function closeEvent(q: Queryable, id: number, endedAt: Date, peak: number) {
  await q.update(alertEvents).set({ endedAt, peak }).where(eq(alertEvents.id, id));
}

/** Closes the watch's open silence, if any, its peak at least the minutes it lasted. */
export async function closeSilence(watchId: number, now: Date, q: Queryable = db()): Promise<number[]> {
  const lasted = sql`extract(epoch FROM ${now.toISOString()}::timestamptz - ${alertEvents.startedAt}) / 60`;
  const open = and(eq(alertEvents.ruleId, watchId), isNull(alertEvents.endedAt));
  const peak = sql<number>`greatest(${alertEvents.peak}, ${lasted})`;
  const rows = await q.update(alertEvents).set({ endedAt: now, peak }).where(open).returning({ id: alertEvents.id });
  return rows.map((r) => r.id);
}

export async function getEvent(id: number, q: Queryable = db()) {
  return (await q.select().from(alertEvents).where(eq(alertEvents.id, id)))[0];
}

/** Events whose open or all-clear e-mail is still owed, from the last day, oldest first. */
export async function undeliveredEvents(
  since: Date,
  q: Queryable = db(),
): Promise<{ id: number; message: DeliveryMessage }[]> {
  const rows = await q
    .select({ id: alertEvents.id, notifiedAt: alertEvents.notifiedAt })
    .from(alertEvents)
    .where(
      or(
        and(isNull(alertEvents.notifiedAt), gt(alertEvents.startedAt, since)),
        and(
          isNotNull(alertEvents.endedAt),
          isNotNull(alertEvents.notifiedAt),
          isNull(alertEvents.clearNotifiedAt),
          gt(alertEvents.endedAt, since),
        ),
      ),
    )
    .orderBy(asc(alertEvents.id));
  return rows.map((r) => ({ id: r.id, message: r.notifiedAt ? "clear" : "open" }));
}

export async function markNotified(id: number, message: DeliveryMessage, now: Date, q: Queryable = db()) {
  await q
    .update(alertEvents)
    .set(message === "open" ? { notifiedAt: now } : { clearNotifiedAt: now })
    .where(eq(alertEvents.id, id));
}

// ---- deliveries: one row per event, member and message, claimed before the e-mail goes

export async function claimDelivery(
  eventId: number,
  userId: number,
  message: DeliveryMessage,
  q: Queryable = db(),
): Promise<boolean> {
  const rows = await q
    .insert(alertDeliveries)
    .values({ eventId, userId, message })
    .onConflictDoNothing()
    .returning({ eventId: alertDeliveries.eventId });
  return rows.length > 0;
}

export async function releaseDelivery(eventId: number, userId: number, message: DeliveryMessage, q: Queryable = db()) {
  await q
    .delete(alertDeliveries)
    .where(
      and(
        eq(alertDeliveries.eventId, eventId),
        eq(alertDeliveries.userId, userId),
        eq(alertDeliveries.message, message),
      ),
    );
}

/** Members who were sent the event's opening: the only ones to get its all-clear. */
export async function heardOpen(eventId: number, q: Queryable = db()): Promise<Set<number>> {
  const opened = and(eq(alertDeliveries.eventId, eventId), eq(alertDeliveries.message, "open"));
  const rows = await q.select({ userId: alertDeliveries.userId }).from(alertDeliveries).where(opened);
  return new Set(rows.map((r) => r.userId));
}
