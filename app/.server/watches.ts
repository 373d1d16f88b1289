// Alert watches (the watches table) of a spot: every change is one function with one transaction that
// writes the audit row beside it. Pausing a cold-snap or silent-sensor watch also e-mails the site's
// owners (after the commit), so a watch cannot be switched off unseen. The default cold watch comes
// with the plants: when a plant is placed in an outdoor spot, the spot gets a cold-snap watch set
// from its most cold-tender plant (and a silent-sensor watch), never on an empty spot.
import { and, eq, isNull, ne } from "drizzle-orm";
import { db, type Db, type Tx } from "~/.server/db";
import { publicUrl } from "~/.server/env";
import { oneLine } from "~/.server/ids";
import { sendMail } from "~/.server/mail";
import {
  alertEvents,
  watches,
  auditLog,
  customPlants,
  memberships,
  sites,
  spotPlants,
  spots,
  users,
  type Watch,
} from "~/db/schema.server";
import { defaultColdWatch, type DefaultWatch } from "~/domain/alerts/default-watch";
import { KINDS, type AlertKind } from "~/domain/alerts/rules";
import { PLANT_LIBRARY } from "~/domain/plants/library";

type Q = Db | Tx;

export type WatchSettings = {
  threshold: number;
  durationMinutes: number;
  hysteresis: number;
  clearMinutes: number;
  earlyWarning: boolean;
};
type Actor = { id: number; name: string };

const SETTING_KEYS = ["threshold", "durationMinutes", "hysteresis", "clearMinutes", "earlyWarning"] as const;

/** The cold watch this spot would get from the plants standing in it; null when none is placed there. */
export async function suggestedColdWatch(spotId: number, siteId: number, q: Q = db()): Promise<DefaultWatch | null> {
  const placed = await q
    .select({ plantKey: spotPlants.plantKey, nickname: spotPlants.nickname })
    .from(spotPlants)
    .where(eq(spotPlants.spotId, spotId));
  if (placed.length === 0) return null;
  const custom = await q
    .select({ key: customPlants.key, profile: customPlants.profile })
    .from(customPlants)
    .where(eq(customPlants.siteId, siteId));
  const library = [
    ...PLANT_LIBRARY,
    ...custom
      .map((c) => ({ key: c.key, ...(c.profile as { name?: string; minNightC?: number }) }))
      .filter(
        (c): c is { key: string; name: string; minNightC: number } =>
          typeof c.minNightC === "number" && typeof c.name === "string",
      ),
  ];
  return defaultColdWatch(placed, library);
}

const audit = (q: Q, siteId: number, actorId: number | null, action: string, detail: Record<string, unknown>) =>
  q.insert(auditLog).values({ siteId, actorId, action, detail });

/**
 * Gives an outdoor spot with plants in it its default cold-snap watch (and a silent-sensor watch)
 * when it has none. A default watch the owner never changed (it still carries its reason) follows
 * a more tender plant placed later upwards. Indoor and empty spots are left alone. Runs inside the
 * caller's transaction (placing a plant, making a spot outdoor) or on its own.
 */
export async function ensureColdWatch(
  opts: { siteId: number; spotId: number; actorId: number | null },
  q?: Q,
): Promise<AlertKind[]> {
  if (!q) return db().transaction((tx) => ensureColdWatch(opts, tx));
  const [spot] = await q
    .select({ id: spots.id, name: spots.name, indoor: spots.indoor })
    .from(spots)
    .where(and(eq(spots.id, opts.spotId), eq(spots.siteId, opts.siteId)));
  if (!spot || spot.indoor) return [];
  const w = await suggestedColdWatch(spot.id, opts.siteId, q);
  if (!w) return [];
  const existing = await q.select().from(watches).where(eq(watches.spotId, spot.id)).for("update");
  const added: AlertKind[] = [];
  const cold = existing.find((r) => r.kind === "cold");
  const d = KINDS.cold.defaults;
  if (!cold) {
    const [rule] = await q
      .insert(watches)
      .values({
        spotId: spot.id,
        kind: "cold",
        threshold: w.threshold,
        durationMinutes: d.durationMinutes,
        hysteresis: d.hysteresis,
        clearMinutes: d.clearMinutes,
        earlyWarning: true,
        reason: w.reason,
      })
      .returning({ id: watches.id });
    await audit(q, opts.siteId, opts.actorId, "watch.add", {
      spotId: spot.id,
      spot: spot.name,
      ruleId: rule.id,
      kind: "cold",
      threshold: w.threshold,
      automatic: true,
    });
    added.push("cold");
  } else if (cold.reason && w.threshold > cold.threshold) {
    await q.update(watches).set({ threshold: w.threshold, reason: w.reason }).where(eq(watches.id, cold.id));
    await audit(q, opts.siteId, opts.actorId, "watch.update", {
      spotId: spot.id,
      spot: spot.name,
      ruleId: cold.id,
      kind: "cold",
      changes: { threshold: [cold.threshold, w.threshold] },
      automatic: true,
    });
  }
  if (!existing.some((r) => r.kind === "silent")) {
    const [rule] = await q
      .insert(watches)
      .values({
        spotId: spot.id,
        kind: "silent",
        threshold: KINDS.silent.defaults.threshold,
        durationMinutes: 0,
        hysteresis: 0,
        clearMinutes: 0,
        reason: "A sensor that stops sending hides a cold night.",
      })
      .returning({ id: watches.id });
    await audit(q, opts.siteId, opts.actorId, "watch.add", {
      spotId: spot.id,
      spot: spot.name,
      ruleId: rule.id,
      kind: "silent",
      automatic: true,
    });
    added.push("silent");
  }
  return added;
}

export async function addWatch(opts: {
  siteId: number;
  spot: { id: number; name: string };
  actorId: number;
  kind: AlertKind;
  settings: WatchSettings;
  reason?: string;
}) {
  return db().transaction(async (tx) => {
    const [rule] = await tx
      .insert(watches)
      .values({ spotId: opts.spot.id, kind: opts.kind, ...opts.settings, reason: opts.reason ?? "" })
      .returning();
    await audit(tx, opts.siteId, opts.actorId, "watch.add", {
      spotId: opts.spot.id,
      spot: opts.spot.name,
      ruleId: rule.id,
      kind: opts.kind,
      ...opts.settings,
    });
    return rule;
  });
}

/** Saves new settings; a changed threshold is the owner's own, so the default's reason goes. */
export async function updateWatch(opts: {
  siteId: number;
  spot: { id: number; name: string };
  actorId: number;
  rule: Watch;
  settings: WatchSettings;
}) {
  const { rule, settings } = opts;
  const changes: Record<string, [unknown, unknown]> = {};
  for (const k of SETTING_KEYS) if (rule[k] !== settings[k]) changes[k] = [rule[k], settings[k]];
  await db().transaction(async (tx) => {
    const changedThreshold = settings.threshold !== rule.threshold;
    await tx
      .update(watches)
      .set({ ...settings, reason: changedThreshold ? "" : rule.reason, pendingSince: null, clearingSince: null })
      .where(eq(watches.id, rule.id));
    await audit(tx, opts.siteId, opts.actorId, "watch.update", {
      spotId: opts.spot.id,
      spot: opts.spot.name,
      ruleId: rule.id,
      kind: rule.kind,
      changes,
    });
  });
  return changes;
}

export async function deleteWatch(opts: {
  siteId: number;
  spot: { id: number; name: string };
  actorId: number;
  rule: Watch;
}) {
  await db().transaction(async (tx) => {
    await tx.delete(watches).where(eq(watches.id, opts.rule.id));
    await audit(tx, opts.siteId, opts.actorId, "watch.delete", {
      spotId: opts.spot.id,
      spot: opts.spot.name,
      ruleId: opts.rule.id,
      kind: opts.rule.kind,
      threshold: opts.rule.threshold,
    });
  });
}

/**
 * Pauses or resumes a watch. Pausing ends an open event without an all-clear (nobody is watching it
 * any more) and resets the state. The change is audited; pausing a cold-snap or silent-sensor watch
 * e-mails every owner of the site but the one who paused it.
 */
export async function setWatchPaused(opts: {
  siteId: number;
  spot: { id: number; name: string };
  actor: Actor;
  rule: Watch;
  paused: boolean;
  now?: Date;
}) {
  const now = opts.now ?? new Date();
  const changed = await db().transaction(async (tx) => {
    const [row] = await tx
      .update(watches)
      .set({ paused: opts.paused, pendingSince: null, clearingSince: null, warnedAt: null })
      .where(and(eq(watches.id, opts.rule.id), eq(watches.paused, !opts.paused)))
      .returning({ id: watches.id });
    if (!row) return null; // already in that state: nothing to record or tell
    const closed = opts.paused
      ? await tx
          .update(alertEvents)
          .set({ endedAt: now, clearNotifiedAt: now })
          .where(and(eq(alertEvents.ruleId, opts.rule.id), isNull(alertEvents.endedAt)))
          .returning({ id: alertEvents.id })
      : [];
    await audit(tx, opts.siteId, opts.actor.id, opts.paused ? "watch.pause" : "watch.resume", {
      spotId: opts.spot.id,
      spot: opts.spot.name,
      ruleId: opts.rule.id,
      kind: opts.rule.kind,
      ...(closed.length ? { closedEvents: closed.map((c) => c.id) } : {}),
    });
    return { closed: closed.length };
  });
  if (!changed) return { changed: false, notified: [] as string[] };
  const notified =
    opts.paused && (opts.rule.kind === "cold" || opts.rule.kind === "silent")
      ? await tellOwnersOfPause(opts, changed.closed)
      : [];
  return { changed: true, notified };
}

const PAUSE_EFFECT: Partial<Record<AlertKind, string>> = {
  cold: "Cold-snap alerts for this spot are off until someone resumes the watch: nobody will be e-mailed on a cold night.",
  silent:
    "Silent-sensor alerts for this spot are off until someone " +
    "resumes the watch: if its sensor stops sending, nobody will be " +
    "told, and a cold night can pass unseen.",
};

async function tellOwnersOfPause(
  opts: { siteId: number; spot: { id: number; name: string }; actor: Actor; rule: Watch },
  closedEvents: number,
) {
  const owners = await db()
    .select({ email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(
      and(eq(memberships.siteId, opts.siteId), eq(memberships.role, "owner"), ne(memberships.userId, opts.actor.id)),
    );
  if (owners.length === 0) return [];
  const [site] = await db().select({ name: sites.name }).from(sites).where(eq(sites.id, opts.siteId));
  const who = oneLine(opts.actor.name, 60);
  const spot = oneLine(opts.spot.name, 60);
  const siteName = oneLine(site?.name ?? "", 60);
  const watch = KINDS[opts.rule.kind].label.toLowerCase();
  const url = `${publicUrl()}/sites/${opts.siteId}/spots/${opts.spot.id}/alerts`;
  const closed =
    closedEvents > 0 ? `An alert that was open on this watch was ended by the pause, without an all-clear.\n\n` : "";
  const effect = PAUSE_EFFECT[opts.rule.kind]!;
  const text =
    `"${who}" paused the ${watch} watch on "${spot}" in "${siteName}".\n\n` +
    `${effect}\n\n${closed}` +
    `If the plants were brought in, nothing needs doing. Otherwise resume the watch here:\n${url}\n`;
  const html =
    `<p>“${escapeHtml(who)}” paused the ${watch} watch on <strong>${escapeHtml(spot)}</strong> in “${escapeHtml(siteName)}”.</p>` +
    `<p>${escapeHtml(effect)}</p>` +
    (closedEvents > 0
      ? `<p>An alert that was open on this watch was ended by the pause, without an all-clear.</p>`
      : "") +
    `<p>If the plants were brought in, nothing needs doing. Otherwise <a href="${url}">resume the watch</a>.</p>`;
  const sent: string[] = [];
  for (const o of owners) {
    try {
      await sendMail({
        to: o.email,
        subject: `${KINDS[opts.rule.kind].label} watch paused on "${spot}" by "${who}"`,
        text,
        html,
      });
      sent.push(o.email);
    } catch (err) {
      console.error(`[watches] pause notice to ${o.email} not sent:`, err instanceof Error ? err.message : err);
    }
  }
  return sent;
}

function escapeHtml(s: string) {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}
