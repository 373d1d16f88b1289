// What ingest needs to know about a sensor (site, where it is now, its secret's hash), cached for a
// few seconds so that a busy sensor costs no query per message.
import { LRUCache } from "lru-cache";
import { pool } from "~/.server/db";
import { checkSensorSecret, hashSensorSecret } from "~/.server/secrets";
import { isSensorId, type SpotKindForLimits } from "~/domain/ingest/payload";

export type SensorInfo = { id: number; siteId: number; timeZone: string; secretHash: string; kind: SpotKindForLimits };

export type LastTemperature = { ms: number; t: number };

const TTL_MS = 10_000;
/** How long "no such sensor" is believed (a sensor added meanwhile is found after this at most). */
export const UNKNOWN_TTL_MS = 10_000;
/** At most this many unknown ids are remembered; the oldest is forgotten first. */
export const MAX_UNKNOWN_IDS = 10_000;
/** Known sensors are bounded by the sensors table; this is a backstop. */
const MAX_KNOWN = 100_000;

// Lifetimes read Date.now() on every check (ttlResolution 0): no timer per millisecond on the
// broker's hot path, and a test that moves Date.now moves the cache's clock too.
const clock = { now: () => Date.now() };

/**
 * Known sensors, stale-while-refresh: an entry past its time is still served (allowStale,
 * noDeleteOnStaleGet) and one refresh runs behind it (`fetch`, one query per sensor however many
 * of its messages arrive): at 25,000 messages a second, making every message of a sensor wait for
 * its own query when the entry lapsed stalled ingest for seconds. Every change that matters (a
 * sensor deleted, its secret or placement changed) invalidates the entry, and deleting it aborts a
 * refresh that started before, so that refresh cannot store what it read.
 */
const known = new LRUCache<number, SensorInfo>({
  max: MAX_KNOWN,
  ttl: TTL_MS,
  ttlResolution: 0,
  perf: clock,
  allowStale: true,
  noDeleteOnStaleGet: true,
  allowStaleOnFetchRejection: true,
  fetchMethod: async (id) => {
    const info = await querySensorInfo(id);
    if (info) return info;
    // No such sensor (any more): forget it, so a lapsed entry is not served again.
    unknown.set(id, true);
    known.delete(id);
    return undefined;
  },
});

/**
 * Ids that are no sensor, remembered for a short while so that a client retrying with one costs
 * no query per try; apart from the known sensors so that a client trying made-up ids can neither
 * grow memory nor push known sensors out. A lapsed entry is dropped, not served.
 */
const unknown = new LRUCache<number, true>({
  max: MAX_UNKNOWN_IDS,
  ttl: UNKNOWN_TTL_MS,
  ttlResolution: 0,
  perf: clock,
});

/** Each sensor's latest accepted temperature (°C as sent, by measuring time), for the jump check. */
const latest = new Map<number, LastTemperature>();

// One options object for every hot-path lookup: lru-cache's `get` would otherwise make one per call.
const lookup: { status: LRUCache.Status<number, SensorInfo> } = { status: {} };

/** How many unknown ids are remembered (for tests and the health page). */
export const unknownSensorIdsCached = () => unknown.size;

/**
 * The cached entry, or undefined when there is none. An entry past its time is still returned,
 * and one refresh starts behind it.
 */
export function cachedSensorInfo(id: number): SensorInfo | null | undefined {
  const info = known.get(id, lookup);
  if (info === undefined) return unknown.get(id) ? null : undefined;
  if (lookup.status.get === "stale") known.fetch(id).catch(() => {}); // the stale entry serves meanwhile
  return info;
}

export async function sensorInfo(id: number): Promise<SensorInfo | null> {
  // Beyond PostgreSQL's integer no sensor exists; asking would fail the query (and read as an outage).
  if (!isSensorId(id)) return null;
  if (unknown.get(id)) return null;
  const cached = known.get(id, lookup);
  if (cached !== undefined && lookup.status.get === "hit") return cached;
  // While the database is away a known sensor may still sign in (allowStaleOnFetchRejection: its
  // writes are refused, so it keeps retrying); refusing the CONNECT would stop clients that give
  // up on a refused CONNACK.
  const status: LRUCache.Status<number, SensorInfo> = {};
  const info = await known.fetch(id, { status });
  if (info === undefined && status.fetchRejected) throw status.fetchError;
  return info === undefined || unknown.has(id) ? null : info;
}

async function querySensorInfo(id: number): Promise<SensorInfo | null> {
  const res = await pool().query<{
    id: number;
    site_id: number;
    time_zone: string;
    secret_hash: string;
    indoor: boolean | null;
  }>(
    `SELECT s.id, s.site_id, si.time_zone, s.secret_hash, sp.indoor FROM sensors s
     JOIN sites si ON si.id = s.site_id
     LEFT JOIN placements p ON p.sensor_id = s.id AND p.to_at IS NULL
     LEFT JOIN spots sp ON sp.id = p.spot_id WHERE s.id = $1`,
    [id],
  );
  const row = res.rows[0];
  return row
    ? {
        id: row.id,
        siteId: row.site_id,
        timeZone: row.time_zone,
        secretHash: row.secret_hash,
        kind: row.indoor == null ? "unplaced" : row.indoor ? "indoor" : "outdoor",
      }
    : null;
}

export function invalidateSensorCache(id?: number) {
  if (id === undefined) {
    known.clear();
    unknown.clear();
    latest.clear();
  } else {
    known.delete(id);
    unknown.delete(id);
    latest.delete(id);
  }
}

/** The sensor's latest accepted temperature, if any (a plain map lookup: runs per message). */
export const lastTemperature = (id: number): LastTemperature | undefined => latest.get(id);

/**
 * Remembers an accepted temperature if it is the sensor's latest by measuring time. Only sensors
 * that passed authentication get here, so the map is bounded by the sensors table.
 */
export function noteTemperature(id: number, ms: number, t: number) {
  const last = latest.get(id);
  if (last === undefined) latest.set(id, { ms, t });
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
      .query("UPDATE sensors SET secret_hash = $1 WHERE id = $2 AND secret_hash = $3", [
        hashSensorSecret(secret),
        id,
        info.secretHash,
      ])
      .then(() => invalidateSensorCache(id))
      .catch(() => {}); // the next connect checks the old hash again
  }
  return info;
}
