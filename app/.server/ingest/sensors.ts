// What ingest needs to know about a sensor (site, where it is now, its secret's hash), cached for a
// few seconds so that a busy sensor costs no query per message.
import { verify } from "@node-rs/argon2";
import { sha256 } from "@oslojs/crypto/sha2";
import { encodeHexLowerCase } from "@oslojs/encoding";
import { pool } from "~/.server/db";
import type { SpotKindForLimits } from "~/domain/ingest/payload";

export type SensorInfo = { id: number; siteId: number; timeZone: string; secretHash: string; kind: SpotKindForLimits };

type Entry = { info: SensorInfo | null; at: number };
type Holder = {
  cache: Map<number, Entry>;
  verified: Map<string, number>;
  /** One query in flight per sensor, however many of its messages arrive meanwhile. */
  fetching: Map<number, Promise<SensorInfo | null>>;
  /** Bumped by invalidation, so a query that started before it cannot store what it read. */
  generation: number;
};
const holder = ((globalThis as Record<string, unknown>).__nichewiseSensors ??= {
  cache: new Map(),
  verified: new Map(),
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
  for (const key of holder.verified.keys()) if (id === undefined || key.startsWith(`${id}:`)) holder.verified.delete(key);
}

/** Checks a sensor's secret against its argon2id hash; a success is remembered for a minute. */
export async function verifySensorSecret(id: number, secret: string): Promise<SensorInfo | null> {
  if (!secret || secret.length > 200) return null;
  const info = await sensorInfo(id);
  if (!info) return null;
  const key = `${id}:${encodeHexLowerCase(sha256(new TextEncoder().encode(secret)))}:${info.secretHash}`;
  const at = holder.verified.get(key);
  if (at && Date.now() - at < 60_000) return info;
  let ok = false;
  try {
    ok = await verify(info.secretHash, secret);
  } catch {
    ok = false;
  }
  if (!ok) return null;
  holder.verified.set(key, Date.now());
  return info;
}
