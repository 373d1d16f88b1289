// A bounded record of refused messages, with the reason, for the admin's ingest health page.
import { pool } from "~/.server/db";

export const KEEP_REJECTIONS = 10_000;

export type Rejected = { sensorId: number | null; source: "mqtt" | "http" | "csv"; topic?: string; reason: string; payload: string };

type Holder = { counts: Map<string, number> };
const holder = ((globalThis as Record<string, unknown>).__nichewiseRejections ??= { counts: new Map() }) as Holder;

export async function recordRejections(items: Rejected[]) {
  if (items.length === 0) return;
  for (const i of items) holder.counts.set(i.reason, (holder.counts.get(i.reason) ?? 0) + 1);
  const p = pool();
  await p.query(
    `INSERT INTO rejected_messages (sensor_id, source, topic, reason, payload)
     SELECT * FROM unnest($1::int[], $2::text[], $3::text[], $4::text[], $5::text[])`,
    [
      items.map((i) => i.sensorId),
      items.map((i) => i.source),
      items.map((i) => i.topic ?? null),
      items.map((i) => i.reason.slice(0, 300)),
      items.map((i) => i.payload.replace(/\u0000/g, "\\0").slice(0, 500)),
    ],
  );
  const bySensor = new Map<number, number>();
  for (const i of items) if (i.sensorId != null) bySensor.set(i.sensorId, (bySensor.get(i.sensorId) ?? 0) + 1);
  for (const [id, n] of bySensor) {
    await p.query("UPDATE sensors SET rejected_count = rejected_count + $2 WHERE id = $1", [id, n]);
  }
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
