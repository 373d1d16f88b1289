// What the alert pages read and change: rules of a spot, events of a site, the banner, preferences.
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { notFound } from "~/.server/auth";
import { db } from "~/.server/db";
import { alertEvents, alertPreferences, alertRules, customPlants, spotPlants, spots, users, type AlertRule } from "~/db/schema.server";
import { defaultColdWatch } from "~/domain/alerts/default-watch";
import { ALERT_KINDS, KINDS, type AlertKind } from "~/domain/alerts/rules";
import { PLANT_LIBRARY } from "~/domain/plants/library";

export async function listRules(spotId: number) {
  return db().select().from(alertRules).where(eq(alertRules.spotId, spotId)).orderBy(alertRules.kind, alertRules.id);
}

export async function getRule(spotId: number, ruleId: unknown) {
  const id = Number(ruleId);
  if (!Number.isInteger(id)) notFound();
  const [rule] = await db().select().from(alertRules).where(and(eq(alertRules.id, id), eq(alertRules.spotId, spotId)));
  if (!rule) notFound();
  return rule;
}

/** The cold watch this spot would get by default, from the plants standing in it. */
export async function suggestedColdWatch(spotId: number, siteId: number) {
  const placed = await db().select({ plantKey: spotPlants.plantKey, nickname: spotPlants.nickname }).from(spotPlants).where(eq(spotPlants.spotId, spotId));
  const custom = await db().select({ key: customPlants.key, profile: customPlants.profile }).from(customPlants).where(eq(customPlants.siteId, siteId));
  const library = [
    ...PLANT_LIBRARY,
    ...custom
      .map((c) => ({ key: c.key, ...(c.profile as { name?: string; minNightC?: number }) }))
      .filter((c): c is { key: string; name: string; minNightC: number } => typeof c.minNightC === "number" && typeof c.name === "string"),
  ];
  return defaultColdWatch(placed, library);
}

/** Adds the default cold watch (and a silent-sensor watch) to an outdoor spot that has none. */
export async function ensureDefaultWatch(spotId: number, siteId: number) {
  const existing = await listRules(spotId);
  const added: AlertKind[] = [];
  if (!existing.some((r) => r.kind === "cold")) {
    const w = await suggestedColdWatch(spotId, siteId);
    const d = KINDS.cold.defaults;
    await db().insert(alertRules).values({ spotId, kind: "cold", threshold: w.threshold, durationMinutes: d.durationMinutes, hysteresis: d.hysteresis, clearMinutes: d.clearMinutes, earlyWarning: true, reason: w.reason });
    added.push("cold");
  }
  if (!existing.some((r) => r.kind === "silent")) {
    await db().insert(alertRules).values({ spotId, kind: "silent", threshold: KINDS.silent.defaults.threshold, durationMinutes: 0, hysteresis: 0, clearMinutes: 0, reason: "A sensor that stops sending hides a cold night." });
    added.push("silent");
  }
  return added;
}

/** Pausing ends an open event quietly (no all-clear: nobody is watching it any more) and resets the state. */
export async function setPaused(rule: AlertRule, paused: boolean) {
  await db().transaction(async (tx) => {
    await tx.update(alertRules).set({ paused, pendingSince: null, clearingSince: null, warnedAt: null }).where(eq(alertRules.id, rule.id));
    if (paused) {
      await tx
        .update(alertEvents)
        .set({ endedAt: new Date(), clearNotifiedAt: new Date() })
        .where(and(eq(alertEvents.ruleId, rule.id), isNull(alertEvents.endedAt)));
    }
  });
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
      threshold: alertRules.threshold,
      acknowledgedAt: alertEvents.acknowledgedAt,
      acknowledgedBy: users.name,
      notifiedAt: alertEvents.notifiedAt,
    })
    .from(alertEvents)
    .innerJoin(spots, eq(spots.id, alertEvents.spotId))
    .innerJoin(alertRules, eq(alertRules.id, alertEvents.ruleId))
    .leftJoin(users, eq(users.id, alertEvents.acknowledgedBy))
    .where(and(eq(spots.siteId, siteId), opts.openOnly ? isNull(alertEvents.endedAt) : undefined))
    .orderBy(sql`${alertEvents.endedAt} IS NULL DESC`, desc(alertEvents.startedAt))
    .limit(opts.limit ?? 50);
}

export async function acknowledge(siteId: number, eventId: unknown, userId: number) {
  const id = Number(eventId);
  if (!Number.isInteger(id)) notFound();
  const [ev] = await db()
    .select({ id: alertEvents.id, acknowledgedAt: alertEvents.acknowledgedAt })
    .from(alertEvents)
    .innerJoin(spots, eq(spots.id, alertEvents.spotId))
    .where(and(eq(alertEvents.id, id), eq(spots.siteId, siteId)));
  if (!ev) notFound();
  // The first acknowledgement stands: it records who took charge.
  if (!ev.acknowledgedAt) await db().update(alertEvents).set({ acknowledgedBy: userId, acknowledgedAt: new Date() }).where(eq(alertEvents.id, id));
}

/** Open events and live early warnings of a site, for the banner. */
export async function alertBanner(siteId: number) {
  const open = await siteEvents(siteId, { openOnly: true, limit: 10 });
  const warned = await db()
    .select({ ruleId: alertRules.id, kind: alertRules.kind, spotId: spots.id, spotName: spots.name, threshold: alertRules.threshold, warnedAt: alertRules.warnedAt })
    .from(alertRules)
    .innerJoin(spots, eq(spots.id, alertRules.spotId))
    .where(and(eq(spots.siteId, siteId), eq(alertRules.paused, false), sql`${alertRules.warnedAt} > now() - interval '3 hours'`));
  const openRules = new Set(open.map((e) => `${e.spotId}:${e.kind}`));
  return {
    open: open.map((e) => ({ id: e.id, kind: e.kind, spotId: e.spotId, spotName: e.spotName, startedAt: e.startedAt.toISOString(), peak: e.peak, threshold: e.threshold, acknowledgedBy: e.acknowledgedBy })),
    warnings: warned
      .filter((w) => !openRules.has(`${w.spotId}:${w.kind}`))
      .map((w) => ({ ruleId: w.ruleId, kind: w.kind, spotId: w.spotId, spotName: w.spotName, threshold: w.threshold, warnedAt: w.warnedAt!.toISOString() })),
  };
}
export type AlertBannerData = Awaited<ReturnType<typeof alertBanner>>;

export async function getPreferences(userId: number, siteId: number) {
  const [p] = await db().select().from(alertPreferences).where(and(eq(alertPreferences.userId, userId), eq(alertPreferences.siteId, siteId)));
  return p ?? { userId, siteId, email: true, kinds: ALERT_KINDS, quietFrom: null, quietTo: null };
}

export async function savePreferences(p: { userId: number; siteId: number; email: boolean; kinds: string[]; quietFrom: number | null; quietTo: number | null }) {
  await db()
    .insert(alertPreferences)
    .values(p)
    .onConflictDoUpdate({ target: [alertPreferences.userId, alertPreferences.siteId], set: { email: p.email, kinds: p.kinds, quietFrom: p.quietFrom, quietTo: p.quietTo } });
}

export async function outdoorSpotIds(siteId: number) {
  return (await db().select({ id: spots.id }).from(spots).where(and(eq(spots.siteId, siteId), eq(spots.indoor, false)))).map((s) => s.id);
}

