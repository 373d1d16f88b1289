// The alerts' one store: every read and write of the evaluator, the notifier, the silence watcher
// and the forecast warnings (watches, events, deliveries, forecast warnings, a spot's readings), on
// the schema's own tables and inferred types (who gets the e-mails: recipients.ts). Drizzle's
// query builder throughout; raw `sql` only for what it cannot say (calibrated values, greatest(),
// epoch arithmetic). Times come from the caller's clock: nothing here reads the database's now().
import {
  and,
  asc,
  desc,
  eq,
  exists,
  getTableColumns,
  gt,
  gte,
  inArray,
  isNotNull,
  isNull,
  lt,
  lte,
  ne,
  or,
  sql,
} from "drizzle-orm";
import { db, type Db } from "~/.server/db";
import { calibratedSql } from "~/.server/ingest/calibrated";
import {
  alertDeliveries,
  alertEvents,
  customPlants,
  forecastWarnings,
  placements,
  readings,
  sensors,
  sites,
  spotPlants,
  spots,
  watches,
  type Watch,
} from "~/db/schema.server";

/** The database or a transaction of it: every function reads and writes through either. */
export type Tx = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];

/** Runs `work` in one transaction: its row locks hold until it commits. */
export function inTransaction(work: (tx: Tx) => Promise<void>): Promise<void> {
  return db().transaction(work);
}

/** A watch with what its messages name: its spot and site. */
export type WatchInContext = Watch & { spotName: string; siteId: number; siteName: string; timeZone: string };
export type OpenEvent = { id: number; startedAt: Date; peak: number | null };
export type SpotPoint = { at: Date; t: number | null; h: number | null; battery: number | null };
export type DeliveryMessage = (typeof alertDeliveries.$inferSelect)["message"];

const contextColumns = {
  ...getTableColumns(watches),
  spotName: spots.name,
  siteId: spots.siteId,
  siteName: sites.name,
  timeZone: sites.timeZone,
};

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
export function watchesOfSpots(
  spotIds: number[],
  opts: { withSilent: boolean },
  q: Tx = db(),
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
export async function evaluatedSpots(q: Tx = db()): Promise<number[]> {
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

export async function saveWatchState(q: Tx, id: number, s: WatchState) {
  const { clearWarning, ...state } = s;
  await q
    .update(watches)
    .set({ ...state, ...(clearWarning ? { warnedAt: null } : {}) })
    .where(eq(watches.id, id));
}

/** Claims the watch's early warning: whoever sets warnedAt sends it, so it goes once. */
export async function claimWarning(id: number, now: Date, q: Tx = db()): Promise<boolean> {
  const claimed = and(eq(watches.id, id), isNull(watches.warnedAt), eq(watches.paused, false));
  return (await q.update(watches).set({ warnedAt: now }).where(claimed).returning({ id: watches.id })).length > 0;
}

/** Re-arms the early warning, unless the condition has started holding meanwhile. */
export async function rearmWarning(id: number, q: Tx = db()) {
  await q
    .update(watches)
    .set({ warnedAt: null })
    .where(and(eq(watches.id, id), isNull(watches.pendingSince)));
}

// ---- events

export async function openEvent(watchId: number, q: Tx = db()): Promise<OpenEvent | undefined> {
  const open = and(eq(alertEvents.ruleId, watchId), isNull(alertEvents.endedAt));
  const columns = { id: alertEvents.id, startedAt: alertEvents.startedAt, peak: alertEvents.peak };
  return (await q.select(columns).from(alertEvents).where(open).orderBy(desc(alertEvents.startedAt)).limit(1))[0];
}

export async function insertEvent(
  q: Tx,
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

export async function setEventPeak(q: Tx, id: number, peak: number) {
  await q.update(alertEvents).set({ peak }).where(eq(alertEvents.id, id));
}

export async function closeEvent(q: Tx, id: number, endedAt: Date, peak: number) {
  await q.update(alertEvents).set({ endedAt, peak }).where(eq(alertEvents.id, id));
}

/** Closes the watch's open silence, if any, its peak at least the minutes it lasted. */
export async function closeSilence(watchId: number, now: Date, q: Tx = db()): Promise<number[]> {
  const lasted = sql`extract(epoch FROM ${now.toISOString()}::timestamptz - ${alertEvents.startedAt}) / 60`;
  const open = and(eq(alertEvents.ruleId, watchId), isNull(alertEvents.endedAt));
  const peak = sql<number>`greatest(${alertEvents.peak}, ${lasted})`;
  const rows = await q.update(alertEvents).set({ endedAt: now, peak }).where(open).returning({ id: alertEvents.id });
  return rows.map((r) => r.id);
}

export async function getEvent(id: number, q: Tx = db()) {
  return (await q.select().from(alertEvents).where(eq(alertEvents.id, id)))[0];
}

/** Events whose open or all-clear e-mail is still owed, from the last day, oldest first. */
export async function undeliveredEvents(
  since: Date,
  q: Tx = db(),
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

export async function markNotified(id: number, message: DeliveryMessage, now: Date, q: Tx = db()) {
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
  q: Tx = db(),
): Promise<boolean> {
  const rows = await q
    .insert(alertDeliveries)
    .values({ eventId, userId, message })
    .onConflictDoNothing()
    .returning({ eventId: alertDeliveries.eventId });
  return rows.length > 0;
}

export async function releaseDelivery(eventId: number, userId: number, message: DeliveryMessage, q: Tx = db()) {
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
export async function heardOpen(eventId: number, q: Tx = db()): Promise<Set<number>> {
  const opened = and(eq(alertDeliveries.eventId, eventId), eq(alertDeliveries.message, "open"));
  const rows = await q.select({ userId: alertDeliveries.userId }).from(alertDeliveries).where(opened);
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

// ---- forecast warnings: one row per spot and night, the e-mails claimed on the row

export type ForecastWarning = typeof forecastWarnings.$inferSelect;
export type ForecastSpot = {
  id: number;
  name: string;
  indoor: boolean;
  siteId: number;
  siteName: string;
  timeZone: string;
};
/** A night's figures as stored: the plant's line and the forecast's lows. */
export type NightFigures = Pick<
  ForecastWarning,
  "plantName" | "damageC" | "likelyC" | "expectedLowC" | "lowerBoundC" | "leafLowC" | "lowAt" | "forecastAt"
>;

const fw = forecastWarnings;
const stillWarned = (spotId: number) => and(eq(fw.spotId, spotId), isNull(fw.endedAt), isNull(fw.clearedAt));

/** Spots of the site (or every site) with placed plants or a warning still standing. */
export function forecastSpots(siteId: number | null, q: Tx = db()): Promise<ForecastSpot[]> {
  const planted = q
    .select({ one: sql`1` })
    .from(spotPlants)
    .where(eq(spotPlants.spotId, spots.id));
  const warned = q
    .select({ one: sql`1` })
    .from(fw)
    .where(and(eq(fw.spotId, spots.id), isNull(fw.endedAt)));
  return q
    .select({
      id: spots.id,
      name: spots.name,
      indoor: spots.indoor,
      siteId: spots.siteId,
      siteName: sites.name,
      timeZone: sites.timeZone,
    })
    .from(spots)
    .innerJoin(sites, eq(sites.id, spots.siteId))
    .where(and(siteId === null ? undefined : eq(spots.siteId, siteId), or(exists(planted), exists(warned))))
    .orderBy(asc(spots.id));
}

export async function plantsOfSpot(spotId: number, siteId: number, q: Tx = db()) {
  const placed = await q
    .select({ plantKey: spotPlants.plantKey })
    .from(spotPlants)
    .where(eq(spotPlants.spotId, spotId));
  if (placed.length === 0) return { placed: [], custom: [] };
  const custom = await q
    .select({ key: customPlants.key, profile: customPlants.profile })
    .from(customPlants)
    .where(eq(customPlants.siteId, siteId));
  return { placed: placed.map((p) => p.plantKey), custom };
}

/** Ends the spot's standing warnings (all, or those whose low came before `lowBefore`): no longer shown, no all-clear. */
export async function endForecastWarnings(spotId: number, at: Date, lowBefore?: Date, q: Tx = db()) {
  await q
    .update(fw)
    .set({ endedAt: at })
    .where(and(eq(fw.spotId, spotId), isNull(fw.endedAt), lowBefore ? lt(fw.lowAt, lowBefore) : undefined));
}

export function standingWarnings(spotId: number, q: Tx = db()): Promise<ForecastWarning[]> {
  return q.select().from(fw).where(stillWarned(spotId));
}

/** A new warned night, or one cleared (or ended) that crosses again; null when it stands already. */
export async function openForecastWarning(
  spotId: number,
  night: string,
  f: NightFigures,
  at: Date,
  q: Tx = db(),
): Promise<number | null> {
  const [row] = await q
    .insert(fw)
    .values({ spotId, night, ...f, openedAt: at })
    .onConflictDoUpdate({
      target: [fw.spotId, fw.night],
      set: { ...f, openedAt: at, notifiedAt: null, clearedAt: null, clearNotifiedAt: null, endedAt: null },
      setWhere: or(isNotNull(fw.clearedAt), isNotNull(fw.endedAt)),
    })
    .returning({ id: fw.id });
  return row?.id ?? null;
}

/** Updates a standing warning's figures (cleared too when `clearedAt` is given); false when none stands. */
export async function updateForecastWarning(
  spotId: number,
  night: string,
  f: Partial<NightFigures> & { clearedAt?: Date },
  q: Tx = db(),
): Promise<boolean> {
  return (
    (
      await q
        .update(fw)
        .set(f)
        .where(and(stillWarned(spotId), eq(fw.night, night)))
        .returning({ id: fw.id })
    ).length > 0
  );
}

/** Warnings and all-clears of the spot not yet e-mailed, oldest first. */
export async function unsentForecastMessages(
  spotId: number,
  q: Tx = db(),
): Promise<(ForecastWarning & { message: "warn" | "clear" })[]> {
  const unsent = or(
    and(isNull(fw.clearedAt), isNull(fw.notifiedAt)),
    and(isNotNull(fw.clearedAt), isNull(fw.clearNotifiedAt)),
  );
  const rows = await q
    .select()
    .from(fw)
    .where(and(eq(fw.spotId, spotId), isNull(fw.endedAt), unsent))
    .orderBy(asc(fw.id));
  return rows.map((r) => ({ ...r, message: r.clearedAt ? "clear" : "warn" }));
}

/** Claims the warning's e-mail (or its all-clear's): whoever sets the column sends it. */
export async function claimForecastMessage(
  id: number,
  message: "warn" | "clear",
  at: Date,
  q: Tx = db(),
): Promise<boolean> {
  const [column, set] =
    message === "warn" ? [fw.notifiedAt, { notifiedAt: at }] : [fw.clearNotifiedAt, { clearNotifiedAt: at }];
  return (
    (
      await q
        .update(fw)
        .set(set)
        .where(and(eq(fw.id, id), isNull(column)))
        .returning({ id: fw.id })
    ).length > 0
  );
}

/** Gives the claim back after a failed send: the next pass sends it again. */
export async function releaseForecastMessage(id: number, message: "warn" | "clear", q: Tx = db()) {
  await q
    .update(fw)
    .set(message === "warn" ? { notifiedAt: null } : { clearNotifiedAt: null })
    .where(eq(fw.id, id));
}

/** Standing warnings of a site whose night is still to come or under way (low after `lowAfter`). */
export function siteForecastWarnings(siteId: number, lowAfter: Date, q: Tx = db()) {
  return q
    .select({ ...getTableColumns(fw), spotName: spots.name })
    .from(fw)
    .innerJoin(spots, eq(spots.id, fw.spotId))
    .where(and(eq(spots.siteId, siteId), isNull(fw.endedAt), isNull(fw.clearedAt), gt(fw.lowAt, lowAfter)))
    .orderBy(asc(fw.lowAt))
    .limit(10);
}

/** What went wrong, for the log: the driver's own message (Drizzle wraps it with the whole statement). */
export function failure(err: unknown): unknown {
  if (!(err instanceof Error)) return err;
  return err.cause instanceof Error ? err.cause.message : err.message;
}
