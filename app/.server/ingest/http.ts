// HTTP ingest: one reading or a batch from a sensor that buffered while offline. Authenticated with
// the sensor's secret as a bearer token; same validation and writer as MQTT; 2xx only after COMMIT.
import { isSensorId, validateReading, type Reading } from "~/domain/ingest/payload";
import { recordRejectionsSoon, type Rejected } from "~/.server/ingest/rejections";
import { lastTemperature, noteTemperature, verifySensorSecret } from "~/.server/ingest/sensor-cache";
import { writer, type ReadingWriter, type WriteResult } from "~/.server/ingest/writer";

export const MAX_HTTP_BATCH = 10_000;
export const MAX_HTTP_BYTES = 4 * 1024 * 1024;

// JSON.stringify recurses: an item nested a million levels deep would throw RangeError.
const preview = (item: unknown) => {
  try {
    return JSON.stringify(item)?.slice(0, 500) ?? "";
  } catch {
    return "(too deeply nested to show)";
  }
};

const json = (body: unknown, status = 200) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

/** Reads at most `limit` bytes of the body, refusing more without buffering it. */
export async function readLimited(request: Request, limit: number): Promise<string | null> {
  const declared = Number(request.headers.get("Content-Length") ?? "0");
  if (declared > limit) return null;
  if (!request.body) return "";
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limit) {
      await reader.cancel();
      return null;
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks).toString("utf8");
}

/** A reading of this request that holds a different value for a time already given or stored. */
type Conflict = { index: number; time: string; reason: string };
const SAME_REQUEST = "a different reading for the same time earlier in this request (kept the first)";
const ALREADY_STORED = "a different reading is already stored for this time (kept the stored one)";

/** True when two readings disagree in a channel both carry (a plain resend agrees). */
const disagree = (a: Reading, b: Reading) =>
  (a.temperature !== null && b.temperature !== null && a.temperature !== b.temperature) ||
  (a.humidity !== null && b.humidity !== null && a.humidity !== b.humidity) ||
  (a.lux !== null && b.lux !== null && a.lux !== b.lux);

export async function handleHttpIngest(request: Request, w: ReadingWriter = writer()): Promise<Response> {
  if (request.method !== "POST") return json({ error: "POST readings here" }, 405);
  const auth = request.headers.get("Authorization") ?? "";
  const m = /^Bearer (\d+)\.([A-Za-z0-9]+)$/.exec(auth.trim());
  if (!m) return json({ error: "Send Authorization: Bearer <sensor id>.<secret>" }, 401);
  const sensorId = Number(m[1]);
  // An id no sensor can have (beyond PostgreSQL's integer) is a wrong token, not an outage: a 503
  // would make the sensor retry forever.
  if (!isSensorId(sensorId)) return json({ error: "Unknown sensor or wrong secret" }, 401);
  const info = await verifySensorSecret(sensorId, m[2]).catch(() => undefined);
  if (info === undefined) return json({ error: "Storage unavailable, try again" }, 503);
  if (!info) return json({ error: "Unknown sensor or wrong secret" }, 401);

  const text = await readLimited(request, MAX_HTTP_BYTES);
  if (text === null) return json({ error: `Body over ${MAX_HTTP_BYTES / 1024 / 1024} MB: send smaller batches` }, 413);
  let body: unknown;
  try {
    body = JSON.parse(text.replace(/^\uFEFF/, ""));
  } catch {
    recordRejectionsSoon([{ sensorId, source: "http", reason: "payload is not JSON", payload: text.slice(0, 500) }]);
    return json({ error: "Body is not JSON" }, 400);
  }
  const items: unknown[] =
    body && typeof body === "object" && !Array.isArray(body) && Array.isArray((body as { readings?: unknown }).readings)
      ? (body as { readings: unknown[] }).readings
      : Array.isArray(body)
        ? body
        : [body];
  if (items.length > MAX_HTTP_BATCH) return json({ error: `At most ${MAX_HTTP_BATCH} readings per request` }, 413);

  const now = new Date();
  const ok: Reading[] = [];
  const okIndex: number[] = [];
  const rejected: { index: number; reason: string }[] = [];
  const conflicts: Conflict[] = [];
  const toRecord: Rejected[] = [];
  const byTime = new Map<number, Reading>();
  items.forEach((item, index) => {
    if (typeof item !== "object" || item === null || Array.isArray(item)) {
      rejected.push({ index, reason: "not a JSON object" });
      toRecord.push({ sensorId, source: "http", reason: "not a JSON object", payload: preview(item) });
      return;
    }
    const r = validateReading(sensorId, item as never, { now, kind: info.kind, previous: lastTemperature(sensorId) });
    if (!r.ok) {
      rejected.push({ index, reason: r.reason });
      toRecord.push({ sensorId, source: "http", reason: r.reason, payload: preview(item) });
      return;
    }
    const ms = r.reading.measuredAt.getTime();
    const earlier = byTime.get(ms);
    if (earlier && disagree(earlier, r.reading)) {
      conflicts.push({ index, time: r.reading.measuredAt.toISOString(), reason: SAME_REQUEST });
      return;
    }
    if (!earlier) byTime.set(ms, r.reading);
    if (r.reading.temperature !== null) noteTemperature(sensorId, ms, r.reading.temperature);
    ok.push(r.reading);
    okIndex.push(index);
  });
  recordRejectionsSoon(toRecord.slice(0, 100));
  let result: WriteResult;
  try {
    result = await w.write(ok);
  } catch {
    return json({ error: "Storage unavailable: nothing was stored, send the same batch again" }, 503);
  }
  if (result.conflictsAt) {
    const at = new Set(result.conflictsAt);
    ok.forEach((r, i) => {
      if (at.has(r.measuredAt.getTime()))
        conflicts.push({ index: okIndex[i], time: r.measuredAt.toISOString(), reason: ALREADY_STORED });
    });
    conflicts.sort((a, b) => a.index - b.index);
  }
  const stored = result.inserted;
  // `stored` counts rows new to the database; a resent batch stores nothing and that is fine.
  return json({
    received: items.length,
    // A reading that conflicts with another of the same request was valid: accepted, not stored.
    accepted: ok.length + conflicts.filter((c) => c.reason === SAME_REQUEST).length,
    stored,
    duplicates: Math.max(0, ok.length - stored - result.conflicts),
    conflicts: conflicts.length,
    conflicting: conflicts.slice(0, 1000),
    outsideSpot: result.outsideSpot,
    ...(result.outsideSpot > 0
      ? {
          message: `${result.outsideSpot} readings were stored but fall outside any placement of this sensor: assign them on the sensor page`,
        }
      : {}),
    rejected,
  });
}
