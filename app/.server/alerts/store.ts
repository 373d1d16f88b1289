// The alert engine's one store: every read and write of the evaluator, the notifier, the silence
// watcher and the forecast warnings' outbox, on the schema's own tables and inferred types. Drizzle's
// query builder throughout; raw `sql` only for what it cannot say (calibrated values, greatest(),
// epoch arithmetic). Times come from the caller's clock: nothing here reads the database's now().
import { and, asc, eq, getTableColumns, gt, gte, inArray, isNotNull, isNull, lt, lte, ne, or, sql } from "drizzle-orm";
import { db, type Db } from "~/.server/db";
import { calibratedSql } from "~/.server/ingest/calibrated";
import {
  alertDeliveries,
  alertEvents,
  alertPreferences,
  memberships,
  placements,
  readings,
  sensors,
  sites,
  spots,
  users,
  watches,
  type Role,
  type Watch,
} from "~/db/schema.server";
import { ALERT_KINDS } from "~/domain/alerts/rules";

/** The database or a transaction of it: every function reads and writes through either. */
export type Tx = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];

/** A watch with what its messages name: its spot and site. */
export type WatchInContext = Watch & { spotName: string; siteId: number; siteName: string; timeZone: string };
export type OpenEvent = { id: number; startedAt: Date; peak: number | null };
export type SpotPoint = { at: Date; t: number | null; h: number | null; battery: number | null };
export type DeliveryMessage = (typeof alertDeliveries.$inferSelect)["message"];

const contextColumns = { ...getTableColumns(watches), spotName: spots.name, siteId: spots.siteId, siteName: sites.name, timeZone: sites.timeZone };

const inContext = (q: Tx) =>
  q
    .select(contextColumns)
    .from(watches)
    .innerJoin(spots, eq(spots.id, watches.spotId))
    .innerJoin(sites, eq(sites.id, spots.siteId));

const live = and(eq(watches.paused, false), ne(watches.kind, "silent"));

export async function getWatch(id: number, q: Tx = db()): Promise<WatchInContext | undefined> {
  return (await inContext(q).where(eq(watches.id, id)))[0];
}

/** The watch under a row lock for the rest of the transaction: two evaluations never interleave on it. */
export async function lockWatch(q: Tx, id: number): Promise<WatchInContext | undefined> {
  return (await inContext(q).where(eq(watches.id, id)).for("update", { of: watches }))[0];
}

/** Unpaused watches of the spots, in id order; silent-sensor ones too when asked. */
export function watchesOfSpots(spotIds: number[], opts: { withSilent: boolean }, q: Tx = db()): Promise<WatchInContext[]> {
  if (spotIds.length === 0) return Promise.resolve([]);
  return inContext(q)
    .where(and(inArray(watches.spotId, spotIds), eq(watches.paused, false), opts.withSilent ? undefined : ne(watches.kind, "silent")))
    .orderBy(asc(watches.id));
}

/** Spots with a live watch evaluated before: after a restart they are re-read from each cursor. */
export async function evaluatedSpots(q: Tx = db()): Promise<number[]> {
  const rows = await q.selectDistinct({ spotId: watches.spotId }).from(watches).where(and(live, isNotNull(watches.evaluatedTo)));
  return rows.map((r) => r.spotId);
}

export type WatchState = { pendingSince: Date | null; clearingSince: Date | null; evaluatedTo: Date | null; clearWarning: boolean };

export async function saveWatchState(q: Tx, id: number, s: WatchState) {
  await q
    .update(watches)
    .set({ pendingSince: s.pendingSince, clearingSince: s.clearingSince, evaluatedTo: s.evaluatedTo, ...(s.clearWarning ? { warnedAt: null } : {}) })
    .where(eq(watches.id, id));
}

/** Claims the watch's early warning: whoever sets warnedAt sends it, so it goes once. */
export async function claimWarning(id: number, now: Date, q: Tx = db()): Promise<boolean> {
  const rows = await q
    .update(watches)
    .set({ warnedAt: now })
    .where(and(eq(watches.id, id), isNull(watches.warnedAt), eq(watches.paused, false)))
    .returning({ id: watches.id });
  return rows.length > 0;
}

/** Re-arms the early warning, unless the condition has started holding meanwhile. */
export async function rearmWarning(id: number, q: Tx = db()) {
  await q.update(watches).set({ warnedAt: null }).where(and(eq(watches.id, id), isNull(watches.pendingSince)));
}

// ---- events

export async function openEvent(q: Tx, watchId: number): Promise<OpenEvent | undefined> {
  const rows = await q
    .select({ id: alertEvents.id, startedAt: alertEvents.startedAt, peak: alertEvents.peak })
    .from(alertEvents)
    .where(and(eq(alertEvents.ruleId, watchId), isNull(alertEvents.endedAt)))
    .orderBy(sql`${alertEvents.startedAt} DESC`)
    .limit(1);
  return rows[0];
}

export async function insertEvent(q: Tx, w: Pick<Watch, "id" | "spotId" | "kind">, startedAt: Date, peak: number): Promise<number> {
  const [row] = await q.insert(alertEvents).values({ ruleId: w.id, spotId: w.spotId, kind: w.kind, startedAt, peak }).returning({ id: alertEvents.id });
  return row.id;
}

export async function setEventPeak(q: Tx, id: number, peak: number) {
  await q.update(alertEvents).set({ peak }).where(eq(alertEvents.id, id));
}

export async function closeEvent(q: Tx, id: number, endedAt: Date, peak: number) {
  await q.update(alertEvents).set({ endedAt, peak }).where(eq(alertEvents.id, id));
}

/** Closes the watch's open silence, if any, its peak at least the minutes it lasted. */
export async function closeSilence(watchId: number, now: Date, q: Tx = db()): Promise<number[]> {
  const lasted = sql`extract(epoch FROM ${now.toISOString()}::timestamptz - ${alertEvents.startedAt}) / 60`;
  const rows = await q
    .update(alertEvents)
    .set({ endedAt: now, peak: sql`greatest(${alertEvents.peak}, ${lasted})` })
    .where(and(eq(alertEvents.ruleId, watchId), isNull(alertEvents.endedAt)))
    .returning({ id: alertEvents.id });
  return rows.map((r) => r.id);
}

export async function getEvent(id: number, q: Tx = db()) {
  return (await q.select().from(alertEvents).where(eq(alertEvents.id, id)))[0];
}

/** Events whose open or all-clear e-mail is still owed, from the last day, oldest first. */
export async function undeliveredEvents(since: Date, q: Tx = db()): Promise<{ id: number; message: DeliveryMessage }[]> {
  const rows = await q
    .select({ id: alertEvents.id, notifiedAt: alertEvents.notifiedAt })
    .from(alertEvents)
    .where(
      or(
        and(isNull(alertEvents.notifiedAt), gt(alertEvents.startedAt, since)),
        and(isNotNull(alertEvents.endedAt), isNotNull(alertEvents.notifiedAt), isNull(alertEvents.clearNotifiedAt), gt(alertEvents.endedAt, since)),
      ),
    )
    .orderBy(asc(alertEvents.id));
  return rows.map((r) => ({ id: r.id, message: r.notifiedAt ? "clear" : "open" }));
}

export async function markNotified(id: number, message: DeliveryMessage, now: Date, q: Tx = db()) {
  await q
    .update(alertEvents)
    .set(message === "open" ? { notifiedAt: now } : { clearNotifiedAt: now })
    .where(eq(alertEvents.id, id));
}

// ---- deliveries: one row per event, member and message, claimed before the e-mail goes

export async function claimDelivery(eventId: number, userId: number, message: DeliveryMessage, q: Tx = db()): Promise<boolean> {
  const rows = await q.insert(alertDeliveries).values({ eventId, userId, message }).onConflictDoNothing().returning({ eventId: alertDeliveries.eventId });
  return rows.length > 0;
}

export async function releaseDelivery(eventId: number, userId: number, message: DeliveryMessage, q: Tx = db()) {
  await q
    .delete(alertDeliveries)
    .where(and(eq(alertDeliveries.eventId, eventId), eq(alertDeliveries.userId, userId), eq(alertDeliveries.message, message)));
}

/** Members who were sent the event's opening: the only ones to get its all-clear. */
export async function heardOpen(eventId: number, q: Tx = db()): Promise<Set<number>> {
  const rows = await q
    .select({ userId: alertDeliveries.userId })
    .from(alertDeliveries)
    .where(and(eq(alertDeliveries.eventId, eventId), eq(alertDeliveries.message, "open")));
  return new Set(rows.map((r) => r.userId));
}

// ---- readings and sensors

/** Calibrated readings of the sensors placed in the spot at the time, from < at ≤ to, oldest first. */
export async function spotPoints(spotId: number, from: Date, to: Date, q: Tx = db()): Promise<SpotPoint[]> {
  return q
    .select({
      at: readings.measuredAt,
      t: sql<number | null>`${sql.raw(calibratedSql("temperature", '"readings"."temperature"', '"sensors"'))}`,
      h: sql<number | null>`${sql.raw(calibratedSql("humidity", '"readings"."humidity"', '"sensors"'))}`,
      battery: readings.battery,
    })
    .from(placements)
    .innerJoin(sensors, eq(sensors.id, placements.sensorId))
    .innerJoin(
      readings,
      and(
        eq(readings.sensorId, placements.sensorId),
        gte(readings.measuredAt, placements.fromAt),
        or(isNull(placements.toAt), lt(readings.measuredAt, placements.toAt)),
      ),
    )
    .where(and(eq(placements.spotId, spotId), gt(readings.measuredAt, from), lte(readings.measuredAt, to)))
    .orderBy(asc(readings.measuredAt));
}

/**
 * Unpaused silent-sensor watches with the instant their spot went quiet: the latest of a placed
 * sensor's last reading, the start of its placement and the moment that placement was made (a
 * placement dated back, or a last reading from before the sensor came here, is not silence here).
 */
export async function silentWatches(q: Tx = db()): Promise<(WatchInContext & { quietSince: Date })[]> {
  const quiet = q
    .select({
      spotId: placements.spotId,
      quietSince: sql<string>`max(greatest(${sensors.lastSeenAt}, ${placements.fromAt}, ${placements.createdAt}))`.as("quiet_since"),
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

// ---- recipients

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
export async function siteRecipients(siteId: number, q: Tx = db()): Promise<Recipient[]> {
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
    .leftJoin(alertPreferences, and(eq(alertPreferences.userId, memberships.userId), eq(alertPreferences.siteId, memberships.siteId)))
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
