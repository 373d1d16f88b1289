// A bounded record of refused messages, with the reason, for the admin's ingest health page.
import { pool } from "~/.server/db";

export const KEEP_REJECTIONS = 10_000;
export const MAX_REASON_CHARS = 300;
export const MAX_TOPIC_CHARS = 200;
export const MAX_PAYLOAD_CHARS = 500;

export type Rejected = {
  sensorId: number | null;
  source: "mqtt" | "http" | "csv";
  topic?: string;
  reason: string;
  payload: string;
};

/** Rejections by reason since the process started (the health page). */
const counts = new Map<string, number>();

/**
 * Text as PostgreSQL's text takes it: a NUL byte (which it refuses, failing the whole INSERT)
 * shown as `\0`, and at most `max` characters.
 */
export const storable = (s: string, max: number) =>
  (s.includes("\u0000") ? s.replace(/\u0000/g, "\\0") : s).slice(0, max);

// One statement: the rows and each sensor's count go in together or not at all, so the counts on
// the sensor pages always equal the rows on the health page.
const RECORD_SQL = `
WITH ins AS (
  INSERT INTO rejected_messages (sensor_id, source, topic, reason, payload)
  SELECT * FROM unnest($1::int[], $2::text[], $3::text[], $4::text[], $5::text[])
  RETURNING sensor_id
), counted AS (
  UPDATE sensors s SET rejected_count = s.rejected_count + x.n
  FROM (SELECT sensor_id, count(*)::int AS n FROM ins WHERE sensor_id IS NOT NULL GROUP BY sensor_id) x
  WHERE s.id = x.sensor_id
  RETURNING 1
)
SELECT (SELECT count(*)::int FROM ins) AS n`;

export async function recordRejections(items: Rejected[]) {
  if (items.length === 0) return;
  await pool().query(RECORD_SQL, [
    items.map((i) => i.sensorId),
    items.map((i) => i.source),
    items.map((i) => (i.topic == null ? null : storable(i.topic, MAX_TOPIC_CHARS))),
    items.map((i) => storable(i.reason, MAX_REASON_CHARS)),
    items.map((i) => storable(i.payload, MAX_PAYLOAD_CHARS)),
  ]);
  for (const i of items) counts.set(i.reason, (counts.get(i.reason) ?? 0) + 1);
}

/** Logs and swallows: recording a rejection must never take ingest down. */
export function recordRejectionsSoon(items: Rejected[]) {
  recordRejections(items).catch((err) => console.error("[ingest] could not record rejection:", err.message));
}

export async function pruneRejections() {
  await pool().query(
    `DELETE FROM rejected_messages WHERE id < (SELECT min(id) FROM (SELECT id FROM rejected_messages ORDER BY id DESC LIMIT $1) k)`,
    [KEEP_REJECTIONS],
  );
}
