// Readings → watch state → events. Each watch's readings run through the pure state machine in
// ~/domain/alerts/rules under a row lock on the watch, so a restart neither loses an open event nor
// repeats one; the cursor (evaluatedTo) keeps late readings from moving the state back. Early
// warnings project the fresh readings (~/domain/alerts/early-warning) and are claimed on the watch.
import type { Clock } from "~/.server/alerts/clock";
import type { Notifier } from "~/.server/alerts/notifier";
import * as store from "~/.server/alerts/store";
import type { SpotPoint, WatchInContext } from "~/.server/alerts/store";
import type { Queryable } from "~/.server/db";
import { EARLY_WARNING_HISTORY_MINUTES, projectBatch } from "~/domain/alerts/early-warning";
import {
  evaluate,
  isBack,
  valueFor,
  worse,
  type AlertKind,
  type Point,
  type RuleSettings,
  type Transition,
} from "~/domain/alerts/rules";

export type EvaluatorOptions = {
  clock: Clock;
  notifier: Notifier;
  /** Length of a rule minute; the compressed demo front uses 1 s. */
  minuteMs: number;
  /** Readings older than this (behind the clock) are history, e.g. a CSV import: no alerts for them. */
  maxLagMs: number;
};

/** The watch's values among the readings, oldest first; `after` excludes readings at or before it. */
export function pointsOf(
  kind: AlertKind,
  rows: { at: Date; t: number | null; h: number | null; battery: number | null }[],
  after = -Infinity,
): Point[] {
  const points: Point[] = [];
  for (const r of rows) {
    if (r.at.getTime() <= after) continue;
    const v = valueFor(kind, r);
    if (v != null) points.push({ at: r.at, value: v });
  }
  return points;
}

export const settingsOf = (w: WatchInContext): RuleSettings => ({
  kind: w.kind,
  threshold: w.threshold,
  durationMinutes: w.durationMinutes,
  hysteresis: w.hysteresis,
  clearMinutes: w.clearMinutes,
});

type Notice = { eventId: number; message: "open" | "clear" };

export class Evaluator {
  constructor(private readonly o: EvaluatorOptions) {}

  get minuteMs() {
    return this.o.minuteMs;
  }

  /** Readings older than this instant are history: no alerts for them. */
  cutoff(): number {
    return this.o.clock.now().getTime() - this.o.maxLagMs;
  }

  /** Fresh readings of one spot, oldest first, for its (unpaused, not silent) watches. */
  async readings(ws: WatchInContext[], rows: SpotPoint[]) {
    const cutoff = this.cutoff();
    const fresh = rows.filter((r) => r.at.getTime() >= cutoff);
    for (const w of ws) {
      const points = pointsOf(w.kind, fresh);
      if (points.length > 0) await this.apply(w.id, points);
    }
  }

  /** Each live watch of the spot from the stored readings after its cursor (or from `earliest` for one never evaluated). */
  async rederive(spotId: number, earliest: Date | null) {
    const ws = await store.watchesOfSpots([spotId], { withSilent: false });
    const now = this.o.clock.now().getTime();
    const cutoff = this.cutoff();
    const froms = ws.map((w) => {
      const from = w.evaluatedTo?.getTime() ?? (earliest ? earliest.getTime() - 1 : null);
      return from === null ? null : Number.isFinite(cutoff) ? Math.max(from, cutoff - 1) : from;
    });
    const known = froms.filter((f): f is number => f !== null);
    if (known.length === 0) return;
    // One read for all the spot's watches, from the earliest cursor; a day ahead: a sensor's clock
    // may run a little fast, and its readings are stored as sent.
    const stored = await store.spotPoints(spotId, new Date(Math.min(...known)), new Date(now + 86_400_000));
    for (const [i, w] of ws.entries()) {
      const from = froms[i];
      if (from === null) continue;
      const points = pointsOf(w.kind, stored, from);
      if (points.length > 0) await this.apply(w.id, points);
    }
  }

  /** Runs the points through the watch's state machine; events opened or cleared are then e-mailed. */
  async apply(watchId: number, points: Point[]) {
    const notices: Notice[] = [];
    let watch: WatchInContext | undefined;
    let stillOpen = false;
    let fresh: Point[] = [];
    await store.inTransaction(async (tx) => {
      const w = await store.lockWatch(tx, watchId);
      if (!w || w.paused) return;
      watch = w;
      const open = await store.openEvent(watchId, tx);
      const state = {
        pendingSince: w.pendingSince,
        clearingSince: w.clearingSince,
        open: open ? { startedAt: open.startedAt, peak: open.peak ?? points[0].value } : null,
        cursor: w.evaluatedTo,
      };
      const cursor = w.evaluatedTo?.getTime() ?? -Infinity;
      fresh = points.filter((p) => p.at.getTime() >= cursor);
      const { state: next, transitions } = evaluate(settingsOf(w), state, points, this.o.minuteMs);
      let openId: number | null = open?.id ?? null;
      let cleared = false;
      for (const t of transitions) {
        if (t.type === "open") {
          const peak = await this.peakSince(tx, w, t);
          openId = await store.insertEvent(tx, w, t.startedAt, peak);
          if (next.open && transitions[transitions.length - 1] === t)
            next.open.peak = worse(w.kind, next.open.peak, peak);
          notices.push({ eventId: openId, message: "open" });
        } else if (openId != null) {
          await store.closeEvent(tx, openId, t.at, t.peak);
          notices.push({ eventId: openId, message: "clear" });
          openId = null;
          cleared = true;
        }
      }
      if (next.open && openId != null) await store.setEventPeak(tx, openId, next.open.peak);
      stillOpen = next.open != null;
      const saved = {
        pendingSince: next.pendingSince,
        clearingSince: next.clearingSince,
        evaluatedTo: next.cursor ?? null,
        clearWarning: cleared,
      };
      await store.saveWatchState(tx, w.id, saved);
      if (cleared) w.warnedAt = null;
    });
    if (!watch) return;
    // The state is committed: a failed send or a database hiccup from here on is for the timer's
    // retry of undelivered events, not a reason to evaluate the batch again.
    try {
      for (const n of notices) await this.o.notifier.deliverEvent(n.eventId, n.message);
      if (!stillOpen && fresh.length > 0) await this.earlyWarning(watch, fresh);
    } catch (err) {
      console.error("[alerts] notice not sent (the timer retries it):", store.failure(err));
    }
  }

  /** The worst value since the condition began: the pending stretch may span earlier batches. */
  private async peakSince(tx: Queryable, w: WatchInContext, t: Extract<Transition, { type: "open" }>) {
    let peak = t.peak;
    for (const p of pointsOf(w.kind, await store.spotPoints(w.spotId, new Date(t.startedAt.getTime() - 1), t.at, tx)))
      peak = worse(w.kind, peak, p.value);
    return peak;
  }

  private async earlyWarning(w: WatchInContext, batch: Point[]) {
    if (!w.earlyWarning || (w.kind !== "cold" && w.kind !== "heat")) return;
    const latest = batch[batch.length - 1];
    const windowMs = EARLY_WARNING_HISTORY_MINUTES * this.o.minuteMs;
    const history = pointsOf(
      w.kind,
      await store.spotPoints(w.spotId, new Date(batch[0].at.getTime() - windowMs), latest.at),
    );
    const projection = projectBatch(w.kind, w.threshold, history, batch, this.o.minuteMs);
    const now = this.o.clock.now();
    if (w.warnedAt) {
      // Re-arm once the spot is clearly back and the line no longer points at the threshold.
      const settled = now.getTime() - w.warnedAt.getTime() > w.clearMinutes * this.o.minuteMs;
      if (!projection && settled && isBack(w.kind, w.threshold, w.hysteresis, latest.value))
        await store.rearmWarning(w.id);
      return;
    }
    if (!projection) return;
    if (!(await store.claimWarning(w.id, now))) return;
    if (await store.openEvent(w.id)) return;
    await this.o.notifier.earlyWarning(w, projection, latest.value);
  }
}
