// The alert engine in cluster mode. Readings are committed by ingest workers in other processes, so
// each process's writer announces what it committed (spot and time span, on the PostgreSQL channel
// `nichewise_committed`, after the commit); the instance holding the alert lease listens on the
// lease's own session, reads those spans back from the database and hands them to the one engine
// (app/.server/alerts/engine.ts, started through its exported startAlerts, unchanged). A new holder
// starts with the engine's catch-up from each rule's stored cursor, which covers what was announced
// while nobody held the lease.
import type pg from "pg";
import { startAlerts, type AlertEngineOptions } from "~/.server/alerts/engine";
import { spotPoints } from "~/.server/alerts/store";
import { pool } from "~/.server/db";
import type { CommittedReading, ReadingWriter } from "~/.server/ingest/writer";
import { startLease, type Lease } from "~/.server/cluster/lease";

export const COMMITTED_CHANNEL = "nichewise_committed";
/** The alert lease's advisory lock key ("NWAL"). */
export const ALERT_LEASE_KEY = 0x4e57414c;
/** NOTIFY payloads must stay under 8000 bytes; a span is "spot:from:to" (under 40). */
const MAX_SPANS_PER_NOTIFY = 150;
const ANNOUNCE_EVERY_MS = 100;
const FEED_EVERY_MS = 250;
const CATCH_UP_EVERY_MS = 30_000;

type Span = { from: number; to: number };

function merge(spans: Map<number, Span>, spot: number, from: number, to: number) {
  const s = spans.get(spot);
  if (!s) spans.set(spot, { from, to });
  else {
    s.from = Math.min(s.from, from);
    s.to = Math.max(s.to, to);
  }
}

/**
 * Announces this process's committed readings (spot and time span, gathered for 100 ms) to the
 * alert lease's holder. A process that dies between a commit and its announcement leaves those
 * readings to the holder's periodic catch-up.
 */
export function announceCommits(w: ReadingWriter): () => void {
  const spans = new Map<number, Span>();
  let timer: NodeJS.Timeout | null = null;
  const flush = () => {
    timer = null;
    const items = [...spans].map(([spot, s]) => `${spot}:${s.from}:${s.to}`);
    spans.clear();
    for (let i = 0; i < items.length; i += MAX_SPANS_PER_NOTIFY) {
      pool()
        .query("SELECT pg_notify($1, $2)", [COMMITTED_CHANNEL, items.slice(i, i + MAX_SPANS_PER_NOTIFY).join(",")])
        .catch(() => {}); // the holder's catch-up reads them from the cursors
    }
  };
  const off = w.onBatch((rows: CommittedReading[]) => {
    for (const r of rows) {
      const ms = r.measuredAt.getTime();
      merge(spans, r.spotId, ms, ms);
    }
    timer ??= setTimeout(flush, ANNOUNCE_EVERY_MS);
  });
  return () => {
    off();
    if (timer) clearTimeout(timer);
  };
}

/** Parses a `nichewise_committed` payload; malformed parts are skipped. */
export function parseSpans(payload: string): [number, number, number][] {
  const out: [number, number, number][] = [];
  for (const part of payload.split(",")) {
    const [spot, from, to] = part.split(":").map(Number);
    if (Number.isSafeInteger(spot) && Number.isFinite(from) && Number.isFinite(to) && from <= to)
      out.push([spot, from, to]);
  }
  return out;
}

/**
 * Bids for the alert lease; while held, runs the engine (startAlerts) fed from announcements and
 * from this process's own writer. Returns what stops it (letting the lease go).
 */
export function startAlertsUnderLease(
  w: ReadingWriter,
  opts: AlertEngineOptions & { connectionString: string; retryMs?: number; catchUpEveryMs?: number },
): Lease {
  const log = opts.log ?? (() => {});
  return startLease({
    connectionString: opts.connectionString,
    key: ALERT_LEASE_KEY,
    retryMs: opts.retryMs,
    log,
    onAcquire: async (session: pg.Client) => {
      const spans = new Map<number, Span>();
      session.on("notification", (n) => {
        if (n.channel !== COMMITTED_CHANNEL || !n.payload) return;
        for (const [spot, from, to] of parseSpans(n.payload)) merge(spans, spot, from, to);
      });
      // Listening before the engine starts (and catches up from its cursors): a commit in between is
      // then read by the one or announced to the other, never missed by both. Re-read readings are
      // skipped by the cursors.
      await session.query(`LISTEN ${COMMITTED_CHANNEL}`);
      const stopEngine = await startAlerts(w, opts);
      const engine = stopEngine.engine;
      let feeding = false;
      const feed = async () => {
        if (feeding || spans.size === 0) return;
        feeding = true;
        const todo = [...spans];
        spans.clear();
        try {
          for (const [spotId, s] of todo) {
            let points;
            try {
              points = await spotPoints(spotId, new Date(s.from - 1), new Date(s.to));
            } catch {
              merge(spans, spotId, s.from, s.to); // read again on the next round
              continue;
            }
            const rows: CommittedReading[] = points.map((p) => ({
              spotId,
              sensorId: 0,
              measuredAt: p.at,
              t: p.t,
              h: p.h,
              battery: p.battery,
            }));
            if (rows.length > 0) void engine.accept(rows);
          }
        } finally {
          feeding = false;
        }
      };
      const feeder = setInterval(() => void feed(), FEED_EVERY_MS);
      const catchUp = setInterval(() => void engine.catchUp(), opts.catchUpEveryMs ?? CATCH_UP_EVERY_MS);
      log("alert engine: this instance holds the alert lease");
      return async () => {
        clearInterval(feeder);
        clearInterval(catchUp);
        await stopEngine();
      };
    },
  });
}
