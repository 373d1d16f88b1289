// What ingest needs to know about a sensor (site, where it is now, its secret's hash), cached for a
// few seconds so that a busy sensor costs no query per message.
import { pool } from "~/.server/db";
import { checkSensorSecret, hashSensorSecret } from "~/.server/secrets";
import { isSensorId, type SpotKindForLimits } from "~/domain/ingest/payload";

export type SensorInfo = { id: number; siteId: number; timeZone: string; secretHash: string; kind: SpotKindForLimits };

type Entry = { info: SensorInfo | null; at: number };
type Holder = {
  cache: Map<number, Entry>;
  /** One query in flight per sensor, however many of its messages arrive meanwhile. */
  fetching: Map<number, Promise<SensorInfo | null>>;
  /** Bumped by invalidation, so a query that started before it cannot store what it read. */
  generation: number;
  /**
   * Ids that are no sensor, remembered for a short while so that a client retrying with one costs
   * no query per try; apart from the known sensors (bounded by the table) so that a client trying
   * made-up ids can neither grow memory nor push known sensors out.
   */
  unknown: Map<number, number>;
  /** Each sensor's latest accepted temperature (°C as sent, by measuring time), for the jump check. */
  lastTemperature: Map<number, LastTemperature>;
};
export type LastTemperature = { ms: number; t: number };
const holder = ((globalThis as Record<string, unknown>).__nichewiseSensors ??= {
  cache: new Map(),
  fetching: new Map(),
  generation: 0,
  unknown: new Map(),
  lastTemperature: new Map(),
}) as Holder;
// A holder left on globalThis by an earlier version of this module (dev reload) lacks these.
holder.fetching ??= new Map();
holder.generation ??= 0;
holder.unknown ??= new Map();
holder.lastTemperature ??= new Map();

const TTL_MS = 10_000;
/** How long "no such sensor" is believed (a sensor added meanwhile is found after this at most). */
export const UNKNOWN_TTL_MS = 10_000;
/** At most this many unknown ids are remembered; the oldest is forgotten first. */
export const MAX_UNKNOWN_IDS = 10_000;

function rememberUnknown(id: number) {
  holder.unknown.delete(id); // re-inserted last: a Map iterates in insertion order
  holder.unknown.set(id, Date.now());
  if (holder.unknown.size > MAX_UNKNOWN_IDS) holder.unknown.delete(holder.unknown.keys().next().value!);
}

/** True while `id` is remembered as no sensor; a lapsed entry is dropped. */
function knownUnknown(id: number): boolean {
  const at = holder.unknown.get(id);
  if (at === undefined) return false;
  if (Date.now() - at < UNKNOWN_TTL_MS) return true;
  holder.unknown.delete(id);
  return false;
}

/** How many unknown ids are remembered (for tests and the health page). */
export const unknownSensorIdsCached = () => holder.unknown.size;

/**
 * The cached entry, or undefined when there is none. An entry past its time is still returned,
 * and one refresh starts behind it: at 25,000 messages a second, making every message of a sensor
 * wait for (and each start) its own query when the entry lapsed stalled ingest for seconds. Every
 * change that matters (a sensor deleted, its secret or placement changed) invalidates the entry.
 */
export function cachedSensorInfo(id: number): SensorInfo | null | undefined {
  const hit = holder.cache.get(id);
  if (hit === undefined) return knownUnknown(id) ? null : undefined;
  if (hit && Date.now() - hit.at >= TTL_MS) fetchSensorInfo(id).catch(() => {}); // the stale entry serves meanwhile
  return hit?.info;
}

export async function sensorInfo(id: number): Promise<SensorInfo | null> {
  // Beyond PostgreSQL's integer no sensor exists; asking would fail the query (and read as an outage).
  if (!isSensorId(id)) return null;
  if (knownUnknown(id)) return null;
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
      if (holder.generation === generation) {
        if (info) holder.cache.set(id, { info, at: Date.now() });
        else {
          holder.cache.delete(id); // a deleted sensor: known no more
          rememberUnknown(id);
        }
      }
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
    holder.unknown.clear();
    holder.lastTemperature.clear();
  } else {
    holder.cache.delete(id);
    holder.fetching.delete(id);
    holder.unknown.delete(id);
    holder.lastTemperature.delete(id);
  }
}

/** The sensor's latest accepted temperature, if any (a plain map lookup: runs per message). */
export const lastTemperature = (id: number): LastTemperature | undefined => holder.lastTemperature.get(id);

/**
 * Remembers an accepted temperature if it is the sensor's latest by measuring time. Only sensors
 * that passed authentication get here, so the map is bounded by the sensors table.
 */
export function noteTemperature(id: number, ms: number, t: number) {
  const last = holder.lastTemperature.get(id);
  if (last === undefined) holder.lastTemperature.set(id, { ms, t });
  else if (ms >= last.ms) {
    last.ms = ms;
    last.t = t;
  }
}

/** Checks a sensor's secret against its stored hash. */
export async function verifySensorSecret(id: number, secret: string): Promise<SensorInfo | null> {
  if (!isSensorId(id) || !secret || secret.length > 200) return null;
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
