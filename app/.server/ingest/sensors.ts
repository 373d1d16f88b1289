// What ingest needs to know about a sensor (site, where it is now, its secret's hash), cached for a
// few seconds so that a busy sensor costs no query per message.
import { pool } from "~/.server/db";
import { checkSensorSecret, hashSensorSecret } from "~/.server/secrets";
import type { SpotKindForLimits } from "~/domain/ingest/payload";

export type SensorInfo = { id: number; siteId: number; timeZone: string; secretHash: string; kind: SpotKindForLimits };

type Entry = { info: SensorInfo | null; at: number };
type Holder = {
  cache: Map<number, Entry>;
  /** One query in flight per sensor, however many of its messages arrive meanwhile. */
  fetching: Map<number, Promise<SensorInfo | null>>;
  /** Bumped by invalidation, so a query that started before it cannot store what it read. */
  generation: number;
};
const holder = ((globalThis as Record<string, unknown>).__nichewiseSensors ??= {
  cache: new Map(),
  fetching: new Map(),
  generation: 0,
}) as Holder;
// A holder left on globalThis by an earlier version of this module (dev reload) lacks these.
holder.fetching ??= new Map();
holder.generation ??= 0;

const TTL_MS = 10_000;

/**
 * The cached entry, or undefined when there is none. An entry past its time is still returned,
 * and one refresh starts behind it: at 25,000 messages a second, making every message of a sensor
 * wait for (and each start) its own query when the entry lapsed stalled ingest for seconds. Every
 * change that matters (a sensor deleted, its secret or placement changed) invalidates the entry.
 */
export function cachedSensorInfo(id: number): SensorInfo | null | undefined {
  const hit = holder.cache.get(id);
  if (hit && Date.now() - hit.at >= TTL_MS) fetchSensorInfo(id).catch(() => {}); // the stale entry serves meanwhile
  return hit?.info;
}

export async function sensorInfo(id: number): Promise<SensorInfo | null> {
  const hit = holder.cache.get(id);
  if (hit && Date.now() - hit.at < TTL_MS) return hit.info;
  try {
    return await fetchSensorInfo(id);
  } catch (err) {
    // While the database is away a known sensor may still sign in (its writes are refused, so it
    // keeps retrying); refusing the CONNECT would stop clients that give up on a refused CONNACK.
    if (hit?.info) return hit.info;
    throw err;
  }
}

function fetchSensorInfo(id: number): Promise<SensorInfo | null> {
  let pending = holder.fetching.get(id);
  if (pending) return pending;
  const generation = holder.generation;
  pending = pool()
    .query<{ id: number; site_id: number; time_zone: string; secret_hash: string; indoor: boolean | null }>(
      `SELECT s.id, s.site_id, si.time_zone, s.secret_hash, sp.indoor FROM sensors s
       JOIN sites si ON si.id = s.site_id
       LEFT JOIN placements p ON p.sensor_id = s.id AND p.to_at IS NULL
       LEFT JOIN spots sp ON sp.id = p.spot_id WHERE s.id = $1`,
      [id],
    )
    .then((res) => {
      const row = res.rows[0];
      const info: SensorInfo | null = row
        ? { id: row.id, siteId: row.site_id, timeZone: row.time_zone, secretHash: row.secret_hash, kind: row.indoor == null ? "unplaced" : row.indoor ? "indoor" : "outdoor" }
        : null;
      if (holder.generation === generation) holder.cache.set(id, { info, at: Date.now() });
      return info;
    })
    .finally(() => {
      if (holder.fetching.get(id) === pending) holder.fetching.delete(id);
    });
  holder.fetching.set(id, pending);
  return pending;
}

export function invalidateSensorCache(id?: number) {
  holder.generation++;
  if (id === undefined) {
    holder.cache.clear();
    holder.fetching.clear();
  } else {
    holder.cache.delete(id);
    holder.fetching.delete(id);
  }
}

/** Checks a sensor's secret against its stored hash. */
export async function verifySensorSecret(id: number, secret: string): Promise<SensorInfo | null> {
  if (!secret || secret.length > 200) return null;
  const info = await sensorInfo(id);
  if (!info) return null;
  const { ok, legacy } = await checkSensorSecret(info.secretHash, secret);
  if (!ok) return null;
  if (legacy) {
    // Only if the hash is still the one just checked (a rotation in between wins).
    await pool()
      .query("UPDATE sensors SET secret_hash = $1 WHERE id = $2 AND secret_hash = $3", [hashSensorSecret(secret), id, info.secretHash])
      .then(() => invalidateSensorCache(id))
      .catch(() => {}); // the next connect checks the old hash again
  }
  return info;
}
