// Streaming alert evaluation. Each committed batch from the ingest writer is fed, per spot and rule,
// through the pure state machine in ~/domain/alerts/rules; the rule's state and its events live in
// PostgreSQL (changed under a row lock), so a restart neither loses an open event nor repeats one.
// E-mails are claimed in alert_deliveries before they are sent: at most one per event, member and
// message, even across restarts. A timer checks for silent sensors and retries failed sends.
import type pg from "pg";
import { pool } from "~/.server/db";
import { publicUrl } from "~/.server/env";
import type { CommittedReading, ReadingWriter } from "~/.server/ingest/writer";
import { sendMail } from "~/.server/mail";
import { siteRecipients, spotPoints, type Recipient } from "~/.server/alerts/store";
import { latestReading } from "~/.server/series";
import { EARLY_WARNING_HISTORY_MINUTES, projectCrossing, roundMinutes } from "~/domain/alerts/early-warning";
import { clearMessage, earlyMessage, openMessage, type Composed, type MessageContext } from "~/domain/alerts/messages";
import { inQuietHours } from "~/domain/alerts/quiet";
import { evaluate, isBack, isPast, KINDS, valueFor, worse, type AlertKind, type Point, type Transition } from "~/domain/alerts/rules";

export type AlertEngineOptions = {
  /** Length of a rule minute; the compressed demo front uses 1 s. Silent-sensor minutes are never scaled. */
  minuteMs?: number;
  /** Readings older than this (behind the clock) are history, e.g. a CSV import: no alerts for them. */
  maxLagMs?: number;
  checkEveryMs?: number;
  /** How long stopping waits for pending evaluation (the database may be down). */
  stopWaitMs?: number;
  /** Readings held for evaluation before a spot is re-read from the database instead. */
  maxPending?: number;
  log?: (s: string) => void;
};

type RuleRow = {
  id: number;
  spot_id: number;
  kind: AlertKind;
  threshold: number;
  duration_minutes: number;
  hysteresis: number;
  clear_minutes: number;
  early_warning: boolean;
  paused: boolean;
  reason: string;
  pending_since: Date | null;
  clearing_since: Date | null;
  warned_at: Date | null;
  evaluated_to: Date | null;
  spot_name: string;
  site_id: number;
  site_name: string;
  time_zone: string;
};

const RULE_SELECT = `SELECT r.*, sp.name AS spot_name, sp.site_id, si.name AS site_name, si.time_zone
  FROM watches r JOIN spots sp ON sp.id = r.spot_id JOIN sites si ON si.id = sp.site_id`;

type Notice = { eventId: number; message: "open" | "clear" };

/** Readings held for evaluation across all spots; beyond this a spot is re-read from the database. */
const MAX_PENDING = 50_000;
const RETRY_FIRST_MS = 250;
const RETRY_MAX_MS = 5_000;

export class AlertEngine {
  private chain: Promise<unknown> = Promise.resolve();
  readonly minuteMs: number;
  readonly maxLagMs: number;
  private readonly maxPending: number;
  private readonly log: (s: string) => void;
  /** Committed readings not yet evaluated, per spot. Kept until evaluated, so a failed call loses nothing. */
  private readonly pending = new Map<number, CommittedReading[]>();
  private pendingCount = 0;
  /** Spots whose readings are re-read from the database from each rule's cursor (after an overflow or a restart); the value is the earliest reading let go. */
  private readonly rederive = new Map<number, Date | null>();
  private catchUpAll = false;
  private retryTimer: NodeJS.Timeout | null = null;
  private retryDelay = RETRY_FIRST_MS;
  private settled: (() => void)[] = [];

  constructor(opts: AlertEngineOptions = {}) {
    this.minuteMs = opts.minuteMs ?? 60_000;
    this.maxLagMs = opts.maxLagMs ?? 6 * 3_600_000;
    this.maxPending = opts.maxPending ?? MAX_PENDING;
    this.log = opts.log ?? (() => {});
  }

  /** Work runs one piece at a time, so two batches never race on one rule's state. */
  enqueue<T>(work: () => Promise<T>): Promise<T | undefined> {
    const next = this.chain.then(work).catch((err) => {
      console.error("[alerts]", err);
      return undefined;
    });
    this.chain = next;
    return next;
  }

  /** Takes a committed batch. Its readings join the spot's pending ones and are evaluated merged, in time order. */
  accept(rows: CommittedReading[]) {
    for (const r of rows) {
      const list = this.pending.get(r.spotId) ?? [];
      list.push(r);
      this.pending.set(r.spotId, list);
      this.pendingCount++;
    }
    while (this.pendingCount > this.maxPending) this.overflow();
    return this.enqueue(() => this.flush());
  }

  /** Lets go of the largest spot's held readings: they are stored, so that spot is re-read from the database instead. */
  private overflow() {
    let spot: number | null = null;
    for (const [id, list] of this.pending) if (spot === null || list.length > this.pending.get(spot)!.length) spot = id;
    if (spot === null) return;
    const list = this.pending.get(spot)!;
    const earliest = list.reduce((m, r) => Math.min(m, r.measuredAt.getTime()), Infinity);
    this.pending.delete(spot);
    this.pendingCount -= list.length;
    this.rederive.set(spot, new Date(earliest));
    console.error(`[alerts] ${list.length} readings of spot ${spot} held too long; re-reading them from the database`);
  }

  /** Re-reads every rule's spot from its cursor: readings committed while no engine was listening. */
  catchUp() {
    this.catchUpAll = true;
    return this.enqueue(() => this.flush());
  }

  /**
   * Evaluates what is pending, spot by spot. When a database call fails the spot's readings stay
   * pending (ahead of any that came meanwhile, and merged with them by time) and the whole flush is
   * tried again after a short, growing delay: evaluation stays in order per spot.
   */
  private async flush(now = new Date()) {
    if (this.retryTimer) return; // a retry is scheduled; it takes everything pending
    try {
      if (this.catchUpAll) {
        const spots = await pool().query<{ spot_id: number }>(`SELECT DISTINCT spot_id FROM watches WHERE NOT paused AND kind <> 'silent' AND evaluated_to IS NOT NULL`);
        for (const { spot_id } of spots.rows) this.markRederive(spot_id, null);
        this.catchUpAll = false;
      }
      for (const [spotId, earliest] of [...this.rederive]) {
        await this.rederiveSpot(spotId, earliest, now);
        if (this.rederive.get(spotId) === earliest) this.rederive.delete(spotId);
      }
      for (const spotId of [...this.pending.keys()]) {
        const rows = this.pending.get(spotId);
        if (!rows) continue;
        this.pending.delete(spotId);
        this.pendingCount -= rows.length;
        rows.sort((a, b) => a.measuredAt.getTime() - b.measuredAt.getTime());
        try {
          await this.handleBatch(rows, now);
        } catch (err) {
          // Back in front of what came meanwhile; the next try sorts them together.
          const newer = this.pending.get(spotId) ?? [];
          this.pending.set(spotId, rows.concat(newer));
          this.pendingCount += rows.length;
          throw err;
        }
      }
      this.retryDelay = RETRY_FIRST_MS;
      const waiting = this.settled;
      this.settled = [];
      waiting.forEach((f) => f());
    } catch (err) {
      console.error(`[alerts] evaluation failed, ${this.pendingCount} readings kept; retrying in ${this.retryDelay} ms:`, err instanceof Error ? err.message : err);
      this.retryTimer = setTimeout(() => {
        this.retryTimer = null;
        void this.enqueue(() => this.flush());
      }, this.retryDelay);
      this.retryDelay = Math.min(RETRY_MAX_MS, this.retryDelay * 2);
    }
  }

  private markRederive(spotId: number, earliest: Date | null) {
    const dropped = this.pending.get(spotId);
    if (dropped) {
      this.pendingCount -= dropped.length;
      this.pending.delete(spotId);
      for (const r of dropped) if (!earliest || r.measuredAt < earliest) earliest = r.measuredAt;
    }
    const had = this.rederive.get(spotId);
    this.rederive.set(spotId, had && (!earliest || had < earliest) ? had : earliest);
  }

  /** Each rule of the spot from the stored readings after its cursor (or from `earliest` for one never evaluated). */
  private async rederiveSpot(spotId: number, earliest: Date | null, now: Date) {
    const rules = (await pool().query<RuleRow>(`${RULE_SELECT} WHERE r.spot_id = $1 AND NOT r.paused AND r.kind <> 'silent' ORDER BY r.id`, [spotId])).rows;
    const cutoff = now.getTime() - this.maxLagMs;
    const froms = rules.map((rule) => {
      const from = rule.evaluated_to?.getTime() ?? (earliest ? earliest.getTime() - 1 : null);
      return from === null ? null : Number.isFinite(cutoff) ? Math.max(from, cutoff - 1) : from;
    });
    const known = froms.filter((f): f is number => f !== null);
    if (known.length === 0) return;
    // One read for all the spot's rules, from the earliest cursor; a day ahead: a sensor's clock
    // may run a little fast, and its readings are stored as sent.
    const stored = await spotPoints(spotId, new Date(Math.min(...known)), new Date(now.getTime() + 86_400_000));
    for (const [i, rule] of rules.entries()) {
      const from = froms[i];
      if (from === null) continue;
      const points: Point[] = [];
      for (const p of stored) {
        if (p.at.getTime() <= from) continue; // spotPoints reads after `from`, as it would for this rule alone
        const v = valueFor(rule.kind, p);
        if (v != null) points.push({ at: p.at, value: v });
      }
      if (points.length > 0) await this.applyRule(rule.id, points);
    }
  }

  /** Resolves once every batch handed over so far (including ones still in the writer's microtasks) is evaluated. */
  async idle() {
    for (;;) {
      await new Promise((r) => setImmediate(r));
      const c = this.chain;
      await c;
      if (this.retryTimer || this.pendingCount > 0 || this.rederive.size > 0 || this.catchUpAll) {
        await new Promise<void>((r) => this.settled.push(r));
        continue;
      }
      if (c === this.chain) return;
    }
  }

  /** Gives up waiting after `ms` (the database may stay down): what is still pending is stored, and the next start catches up from the cursors. */
  async idleFor(ms: number) {
    let timer: NodeJS.Timeout | undefined;
    const gaveUp = await Promise.race([
      this.idle().then(() => false),
      new Promise<boolean>((r) => (timer = setTimeout(() => r(true), ms))),
    ]);
    clearTimeout(timer);
    if (gaveUp) console.error(`[alerts] stopped with ${this.pendingCount} readings unevaluated; the next start re-reads them`);
    if (this.retryTimer) clearTimeout(this.retryTimer);
  }

  async handleBatch(rows: CommittedReading[], now = new Date()) {
    const bySpot = new Map<number, CommittedReading[]>();
    for (const r of rows) {
      const list = bySpot.get(r.spotId) ?? [];
      list.push(r);
      bySpot.set(r.spotId, list);
    }
    const rules = (await pool().query<RuleRow>(`${RULE_SELECT} WHERE r.spot_id = ANY($1::int[]) AND NOT r.paused ORDER BY r.id`, [[...bySpot.keys()]])).rows;
    const cutoff = now.getTime() - this.maxLagMs;
    for (const rule of rules) {
      const spotRows = bySpot.get(rule.spot_id)!.slice().sort((a, b) => a.measuredAt.getTime() - b.measuredAt.getTime());
      if (rule.kind === "silent") {
        const talking = spotRows.some((r) => r.measuredAt.getTime() >= now.getTime() - rule.threshold * 60_000);
        if (talking) await this.endSilence(rule, now);
        continue;
      }
      const points: Point[] = [];
      for (const r of spotRows) {
        if (r.measuredAt.getTime() < cutoff) continue;
        const v = valueFor(rule.kind, r);
        if (v != null) points.push({ at: r.measuredAt, value: v });
      }
      if (points.length > 0) await this.applyRule(rule.id, points);
    }
  }

  private async applyRule(ruleId: number, points: Point[]) {
    const notices: Notice[] = [];
    let rule: RuleRow | undefined;
    let stillOpen = false;
    let fresh: Point[] = [];
    await this.transaction(async (c) => {
      rule = (await c.query<RuleRow>(`${RULE_SELECT} WHERE r.id = $1 FOR UPDATE OF r`, [ruleId])).rows[0];
      if (!rule || rule.paused) return;
      const open = (await c.query<{ id: number; started_at: Date; peak: number | null }>(
        `SELECT id, started_at, peak FROM alert_events WHERE rule_id = $1 AND ended_at IS NULL ORDER BY started_at DESC LIMIT 1`,
        [ruleId],
      )).rows[0];
      const state = {
        pendingSince: rule.pending_since,
        clearingSince: rule.clearing_since,
        open: open ? { startedAt: open.started_at, peak: open.peak ?? points[0].value } : null,
        cursor: rule.evaluated_to,
      };
      const cursor = rule.evaluated_to?.getTime() ?? -Infinity;
      fresh = points.filter((p) => p.at.getTime() >= cursor);
      const settings = { kind: rule.kind, threshold: rule.threshold, durationMinutes: rule.duration_minutes, hysteresis: rule.hysteresis, clearMinutes: rule.clear_minutes };
      const { state: next, transitions } = evaluate(settings, state, points, this.minuteMs);
      let openId: number | null = open?.id ?? null;
      let cleared = false;
      for (const t of transitions) {
        if (t.type === "open") {
          const peak = await this.peakSince(rule, t, c);
          const ins = await c.query<{ id: number }>(
            `INSERT INTO alert_events (rule_id, spot_id, kind, started_at, peak) VALUES ($1, $2, $3, $4, $5) RETURNING id`,
            [rule.id, rule.spot_id, rule.kind, t.startedAt, peak],
          );
          openId = ins.rows[0].id;
          if (next.open && transitions[transitions.length - 1] === t) next.open.peak = worse(rule.kind, next.open.peak, peak);
          notices.push({ eventId: openId, message: "open" });
        } else if (openId != null) {
          await c.query(`UPDATE alert_events SET ended_at = $2, peak = $3 WHERE id = $1`, [openId, t.at, t.peak]);
          notices.push({ eventId: openId, message: "clear" });
          openId = null;
          cleared = true;
        }
      }
      if (next.open && openId != null) await c.query(`UPDATE alert_events SET peak = $2 WHERE id = $1`, [openId, next.open.peak]);
      stillOpen = next.open != null;
      await c.query(
        `UPDATE watches SET pending_since = $2, clearing_since = $3, evaluated_to = $5, warned_at = CASE WHEN $4 THEN NULL ELSE warned_at END WHERE id = $1`,
        [rule.id, next.pendingSince, next.clearingSince, cleared, next.cursor ?? null],
      );
      if (cleared) rule.warned_at = null;
    });
    if (!rule || rule.paused) return;
    // The state is committed: a failed send or a database hiccup from here on is for the timer's
    // retry of undelivered events, not a reason to evaluate the batch again.
    try {
      for (const n of notices) await this.deliver(n.eventId, n.message);
      if (!stillOpen && fresh.length > 0) await this.earlyWarning(rule, fresh);
    } catch (err) {
      console.error("[alerts] notice not sent (the timer retries it):", err instanceof Error ? err.message : err);
    }
  }

  /** The worst value since the condition began: the pending stretch may span earlier batches. */
  private async peakSince(rule: RuleRow, t: Extract<Transition, { type: "open" }>, c: pg.PoolClient) {
    let peak = t.peak;
    for (const p of await spotPoints(rule.spot_id, new Date(t.startedAt.getTime() - 1), t.at, c)) {
      const v = valueFor(rule.kind, p);
      if (v != null) peak = worse(rule.kind, peak, v);
    }
    return peak;
  }

  private async earlyWarning(rule: RuleRow, batch: Point[]) {
    if (!rule.early_warning || (rule.kind !== "cold" && rule.kind !== "heat")) return;
    const latest = batch[batch.length - 1];
    const windowMs = EARLY_WARNING_HISTORY_MINUTES * this.minuteMs;
    const history = (await spotPoints(rule.spot_id, new Date(batch[0].at.getTime() - windowMs), latest.at))
      .map((p) => ({ at: p.at, value: valueFor(rule.kind, p) }))
      .filter((p): p is Point => p.value != null);
    // Each reading of the batch in turn, as if they had come one by one; the newest projection wins.
    let projection: ReturnType<typeof projectCrossing> = null;
    for (const b of batch) {
      const upTo = history.filter((p) => p.at.getTime() <= b.at.getTime());
      const p = projectCrossing(rule.kind, rule.threshold, upTo, this.minuteMs);
      if (p) projection = { ...p, minutes: p.minutes - (latest.at.getTime() - b.at.getTime()) / this.minuteMs };
    }
    if (projection && (projection.minutes < 0 || isPast(rule.kind, rule.threshold, latest.value))) projection = null;
    if (rule.warned_at) {
      // Re-arm once the spot is clearly back and the line no longer points at the threshold.
      const settled = Date.now() - rule.warned_at.getTime() > rule.clear_minutes * this.minuteMs;
      if (!projection && settled && isBack(rule.kind, rule.threshold, rule.hysteresis, latest.value)) {
        await pool().query(`UPDATE watches SET warned_at = NULL WHERE id = $1 AND pending_since IS NULL`, [rule.id]);
      }
      return;
    }
    if (!projection) return;
    // The claim is the guard against a second warning: whoever sets warned_at sends it.
    const claimed = await pool().query(`UPDATE watches SET warned_at = now() WHERE id = $1 AND warned_at IS NULL AND NOT paused RETURNING id`, [rule.id]);
    if (claimed.rowCount === 0) return;
    const open = await pool().query(`SELECT 1 FROM alert_events WHERE rule_id = $1 AND ended_at IS NULL`, [rule.id]);
    if ((open.rowCount ?? 0) > 0) return;
    this.log(`Early warning for ${rule.spot_name}: ${rule.kind} threshold in ${Math.round(projection.minutes)} rule minutes`);
    for (const r of await siteRecipients(rule.site_id)) {
      if (!wants(r, rule.kind)) continue;
      const mail = earlyMessage(this.context(rule, r), { minutes: roundMinutes(projection.minutes), ratePerHour: projection.ratePerHour, latest: latest.value });
      await this.send(r, mail).catch((err) => console.error("[alerts] early warning not sent:", err));
    }
  }

  /** Opens silent-sensor events for spots whose sensors have said nothing for longer than the rule allows. */
  async checkSilence(now = new Date()) {
    // A sensor is quiet here from the latest of its last reading, the start of its placement and
    // the moment that placement was made: a placement dated back (a logger's past year) or a last
    // reading from before the sensor came here is not silence in this spot.
    const rules = (await pool().query<RuleRow & { quiet_since: Date | null }>(
      `${RULE_SELECT.replace("FROM watches r", ", x.quiet_since FROM watches r")}
       JOIN LATERAL (SELECT max(greatest(s.last_seen_at, p.from_at, p.created_at)) AS quiet_since
         FROM placements p JOIN sensors s ON s.id = p.sensor_id WHERE p.spot_id = r.spot_id AND p.to_at IS NULL) x ON true
       WHERE r.kind = 'silent' AND NOT r.paused AND x.quiet_since IS NOT NULL`,
    )).rows;
    for (const rule of rules) {
      const since = rule.quiet_since!;
      const minutes = (now.getTime() - since.getTime()) / 60_000;
      if (minutes < rule.threshold) continue;
      let opened: number | null = null;
      await this.transaction(async (c) => {
        await c.query(`SELECT id FROM watches WHERE id = $1 FOR UPDATE`, [rule.id]);
        const open = (await c.query<{ id: number }>(`SELECT id FROM alert_events WHERE rule_id = $1 AND ended_at IS NULL`, [rule.id])).rows[0];
        if (open) {
          await c.query(`UPDATE alert_events SET peak = $2 WHERE id = $1`, [open.id, minutes]);
          return;
        }
        const ins = await c.query<{ id: number }>(
          `INSERT INTO alert_events (rule_id, spot_id, kind, started_at, peak) VALUES ($1, $2, 'silent', $3, $4) RETURNING id`,
          [rule.id, rule.spot_id, since, minutes],
        );
        opened = ins.rows[0].id;
      });
      if (opened != null) await this.deliver(opened, "open");
    }
  }

  /** Closes the rule's open silence, if any: one statement, since a talking sensor usually has none. */
  private async endSilence(rule: RuleRow, now: Date) {
    const closed = await pool().query<{ id: number }>(
      `UPDATE alert_events SET ended_at = $2, peak = greatest(peak, extract(epoch FROM $2::timestamptz - started_at) / 60)
       WHERE rule_id = $1 AND ended_at IS NULL RETURNING id`,
      [rule.id, now],
    );
    for (const { id } of closed.rows) await this.deliver(id, "clear");
  }

  /** Sends what a crash or a mail-server hiccup left unsent. */
  async retryUndelivered() {
    const res = await pool().query<{ id: number; message: "open" | "clear" }>(
      `SELECT id, 'open' AS message FROM alert_events WHERE notified_at IS NULL AND started_at > now() - interval '1 day'
       UNION ALL
       SELECT id, 'clear' FROM alert_events WHERE ended_at IS NOT NULL AND notified_at IS NOT NULL AND clear_notified_at IS NULL
         AND ended_at > now() - interval '1 day'
       ORDER BY id`,
    );
    for (const r of res.rows) await this.deliver(r.id, r.message);
  }

  async deliver(eventId: number, message: "open" | "clear") {
    const ev = (await pool().query<{ id: number; rule_id: number; started_at: Date; ended_at: Date | null; peak: number | null; notified_at: Date | null; clear_notified_at: Date | null }>(
      `SELECT id, rule_id, started_at, ended_at, peak, notified_at, clear_notified_at FROM alert_events WHERE id = $1`,
      [eventId],
    )).rows[0];
    if (!ev || (message === "open" ? ev.notified_at : ev.clear_notified_at)) return;
    const rule = (await pool().query<RuleRow>(`${RULE_SELECT} WHERE r.id = $1`, [ev.rule_id])).rows[0];
    if (!rule) return;
    const latest = message === "open" ? await this.latest(rule) : null;
    // The all-clear goes to those who heard about the event, nobody else.
    const heard =
      message === "clear"
        ? new Set((await pool().query<{ user_id: number }>(`SELECT user_id FROM alert_deliveries WHERE event_id = $1 AND message = 'open'`, [ev.id])).rows.map((d) => d.user_id))
        : null;
    let failed = false;
    for (const r of await siteRecipients(rule.site_id)) {
      if (!wants(r, rule.kind)) continue;
      if (heard) {
        if (!heard.has(r.userId)) continue;
      } else if (!KINDS[rule.kind].urgent && inQuietHours(new Date(), rule.time_zone, r.quietFrom, r.quietTo)) {
        continue;
      }
      const claim = await pool().query(
        `INSERT INTO alert_deliveries (event_id, user_id, message) VALUES ($1, $2, $3) ON CONFLICT DO NOTHING RETURNING 1`,
        [ev.id, r.userId, message],
      );
      if (claim.rowCount === 0) continue;
      const ctx = this.context(rule, r);
      const mail =
        latest
          ? openMessage(ctx, { startedAt: ev.started_at, peak: ev.peak ?? latest.value ?? rule.threshold, latest: latest.value, lastSeenAt: latest.at, lastTemperature: latest.t })
          : clearMessage(ctx, { startedAt: ev.started_at, endedAt: ev.ended_at ?? new Date(), peak: ev.peak ?? rule.threshold });
      try {
        await this.send(r, mail);
      } catch (err) {
        failed = true;
        await pool().query(`DELETE FROM alert_deliveries WHERE event_id = $1 AND user_id = $2 AND message = $3`, [ev.id, r.userId, message]);
        console.error(`[alerts] e-mail to ${r.email} not sent (will retry):`, err instanceof Error ? err.message : err);
      }
    }
    if (!failed) {
      await pool().query(`UPDATE alert_events SET ${message === "open" ? "notified_at" : "clear_notified_at"} = now() WHERE id = $1`, [ev.id]);
      this.log(`Alert ${message === "open" ? "opened" : "cleared"}: ${KINDS[rule.kind].label} at ${rule.spot_name}`);
    }
  }

  private async latest(rule: RuleRow): Promise<{ at: Date | null; value: number | null; t: number | null }> {
    const row = await latestReading(rule.spot_id);
    if (!row) return { at: null, value: null, t: null };
    return { at: new Date(row.measured_at), value: valueFor(rule.kind, { t: row.temp, h: row.rh, battery: row.battery }), t: row.temp };
  }


  private context(rule: RuleRow, r: Recipient): MessageContext {
    const base = publicUrl();
    return {
      siteName: rule.site_name,
      spotName: rule.spot_name,
      spotUrl: `${base}/sites/${rule.site_id}/spots/${rule.spot_id}`,
      alertsUrl: `${base}/sites/${rule.site_id}/alerts`,
      timeZone: rule.time_zone,
      unit: r.unit,
      kind: rule.kind,
      threshold: rule.threshold,
      hysteresis: rule.hysteresis,
      durationMinutes: rule.duration_minutes,
      reason: rule.reason || undefined,
    };
  }

  private async send(r: Recipient, mail: Composed) {
    await sendMail({ to: r.email, subject: mail.subject, text: mail.text, html: mail.html });
  }

  private async transaction(work: (c: pg.PoolClient) => Promise<void>) {
    const c = await pool().connect();
    try {
      await c.query("BEGIN");
      await work(c);
      await c.query("COMMIT");
    } catch (err) {
      await c.query("ROLLBACK").catch(() => {});
      throw err;
    } finally {
      c.release();
    }
  }
}

const wants = (r: Recipient, kind: AlertKind) => r.wantsEmail && r.kinds.includes(kind);

export type RunningAlerts = (() => Promise<void>) & { engine: AlertEngine };

/** Registers the engine on the writer, starts its timer and returns the function that stops both. */
export async function startAlerts(w: ReadingWriter, opts: AlertEngineOptions = {}): Promise<RunningAlerts> {
  const engine = new AlertEngine(opts);
  const off = w.onBatch((rows) => engine.accept(rows).then(() => {}));
  void engine.catchUp();
  const check = () =>
    engine.enqueue(async () => {
      await engine.checkSilence();
      await engine.retryUndelivered();
    });
  await check();
  const timer = setInterval(check, opts.checkEveryMs ?? 30_000);
  timer.unref();
  const stop = async () => {
    off();
    clearInterval(timer);
    await engine.idleFor(opts.stopWaitMs ?? 30_000);
  };
  return Object.assign(stop, { engine });
}
