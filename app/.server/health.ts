// Ingest health for the installation admin.
import { pool } from "~/.server/db";
import { runningBroker } from "~/.server/ingest/broker";
import { writer } from "~/.server/ingest/writer";
import { sunkMail } from "~/.server/mail";

const pct = (xs: number[], p: number) => {
  if (xs.length === 0) return null;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))];
};

export async function ingestHealth() {
  const p = pool();
  const [perMinute, reasons, latest, sizes, range] = await Promise.all([
    p.query<{ minute: string; n: number }>(
      `SELECT date_trunc('minute', received_at) AS minute, count(*)::int AS n FROM readings
       WHERE measured_at > now() - interval '2 hours' AND received_at > now() - interval '1 hour' GROUP BY 1 ORDER BY 1`,
    ),
    p.query<{ reason: string; n: number; last: string }>(
      `SELECT reason, count(*)::int AS n, max(at) AS last FROM rejected_messages GROUP BY reason ORDER BY n DESC LIMIT 20`,
    ),
    p.query<{
      id: number;
      at: string;
      sensor_id: number | null;
      source: string;
      topic: string | null;
      reason: string;
      payload: string;
    }>(`SELECT id, at, sensor_id, source, topic, reason, payload FROM rejected_messages ORDER BY id DESC LIMIT 20`),
    p.query<{ name: string; bytes: string }>(
      `SELECT c.relname AS name, pg_total_relation_size(c.oid) + ` +
        `coalesce((SELECT sum(pg_total_relation_size(i.inhrelid)) FROM pg_inherits i WHERE i.inhparent = c.oid), 0) AS bytes
       FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
       WHERE n.nspname = 'public' AND c.relkind IN ('r', 'p') AND NOT c.relispartition ORDER BY 2 DESC`,
    ),
    p.query<{ oldest: string | null; newest: string | null; total: string }>(
      `SELECT min(measured_at) AS oldest, max(measured_at) AS newest, ` +
        `(SELECT sum(reltuples)::bigint FROM pg_class WHERE relname LIKE ` +
        `'readings_%') AS total FROM readings`,
    ),
  ]);
  const b = runningBroker();
  const w = writer().stats;
  return {
    broker: b
      ? { up: true, port: b.port, wsPort: b.wsPort, connected: b.connectedSensors(), stats: b.stats }
      : { up: false },
    writer: {
      batches: w.batches,
      readings: w.readings,
      inserted: w.inserted,
      failures: w.failures,
      p50: pct(w.commitMs, 50),
      p99: pct(w.commitMs, 99),
    },
    perMinute: perMinute.rows,
    reasons: reasons.rows,
    latest: latest.rows,
    sizes: sizes.rows.map((r) => ({ name: r.name, bytes: Number(r.bytes) })),
    range: range.rows[0],
    mail: sunkMail()
      .slice(-20)
      .reverse()
      .map((m) => ({ id: m.id, at: m.at, to: m.to, subject: m.subject })),
  };
}
