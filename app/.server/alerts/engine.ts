// The alert engine: takes each batch the ingest writer commits and hands it, spot by spot and in
// time order, to the evaluator (readings → watch state → events) and the silence watcher; a timer
// checks for silent sensors and has the notifier retry e-mails that failed. Work runs one piece at
// a time; readings stay held until evaluated, so a database hiccup delays alerts but loses none.
import { systemClock, type Clock } from "~/.server/alerts/clock";
import { Evaluator } from "~/.server/alerts/evaluator";
import { Notifier } from "~/.server/alerts/notifier";
import { SilenceWatcher } from "~/.server/alerts/silence";
import * as store from "~/.server/alerts/store";
import type { CommittedReading, ReadingWriter } from "~/.server/ingest/writer";

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
  clock?: Clock;
  log?: (s: string) => void;
};

/** Readings held for evaluation across all spots; beyond this a spot is re-read from the database. */
const MAX_PENDING = 50_000;
const RETRY_FIRST_MS = 250;
const RETRY_MAX_MS = 5_000;

export class AlertEngine {
  private chain: Promise<unknown> = Promise.resolve();
  readonly clock: Clock;
  readonly notifier: Notifier;
  readonly evaluator: Evaluator;
  readonly silence: SilenceWatcher;
  private readonly maxPending: number;
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
    this.clock = opts.clock ?? systemClock;
    this.maxPending = opts.maxPending ?? MAX_PENDING;
    this.notifier = new Notifier({ clock: this.clock, log: opts.log });
    this.evaluator = new Evaluator({
      clock: this.clock,
      notifier: this.notifier,
      minuteMs: opts.minuteMs ?? 60_000,
      maxLagMs: opts.maxLagMs ?? 6 * 3_600_000,
    });
    this.silence = new SilenceWatcher({ clock: this.clock, notifier: this.notifier });
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
  private async flush() {
    if (this.retryTimer) return; // a retry is scheduled; it takes everything pending
    try {
      if (this.catchUpAll) {
        for (const spotId of await store.evaluatedSpots()) this.markRederive(spotId, null);
        this.catchUpAll = false;
      }
      for (const [spotId, earliest] of [...this.rederive]) {
        await this.evaluator.rederive(spotId, earliest);
        if (this.rederive.get(spotId) === earliest) this.rederive.delete(spotId);
      }
      for (const spotId of [...this.pending.keys()]) {
        const rows = this.pending.get(spotId);
        if (!rows) continue;
        this.pending.delete(spotId);
        this.pendingCount -= rows.length;
        rows.sort((a, b) => a.measuredAt.getTime() - b.measuredAt.getTime());
        try {
          await this.handleBatch(spotId, rows);
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
      console.error(
        `[alerts] evaluation failed, ${this.pendingCount} readings kept; retrying in ${this.retryDelay} ms:`,
        store.failure(err),
      );
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
    if (gaveUp)
      console.error(`[alerts] stopped with ${this.pendingCount} readings unevaluated; the next start re-reads them`);
    if (this.retryTimer) clearTimeout(this.retryTimer);
  }

  /** One spot's readings, oldest first: to its silent-sensor watches and to the evaluator. */
  private async handleBatch(spotId: number, rows: CommittedReading[]) {
    const ws = await store.watchesOfSpots([spotId], { withSilent: true });
    const live = ws.filter((w) => w.kind !== "silent");
    for (const w of ws)
      if (w.kind === "silent")
        await this.silence.heard(
          w,
          rows.map((r) => r.measuredAt),
        );
    if (live.length > 0)
      await this.evaluator.readings(
        live,
        rows.map((r) => ({ at: r.measuredAt, t: r.t, h: r.h, battery: r.battery })),
      );
  }

  /** Opens silent-sensor events that are due. */
  checkSilence() {
    return this.silence.check();
  }

  /** Sends what a crash or a mail-server hiccup left unsent. */
  retryUndelivered() {
    return this.notifier.retryUndelivered();
  }
}

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
