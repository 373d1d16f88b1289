// Reading a spot's hourly rollups: straight from PostgreSQL (fetchRollups), or through the
// in-memory cache of past hours (loadRollups), which every page that judges a season uses.
import { LRUCache } from "lru-cache";
import { pool } from "~/.server/db";
import type { HourlyRollup } from "~/domain/season/types";

/** Straight from PostgreSQL, no cache. */
export async function fetchRollups(spotIds: number[], from: Date, to: Date): Promise<Map<number, HourlyRollup[]>> {
  // One JSON document of columns per spot instead of ~8,760 rows each: parsing rows of text values
  // costs more than PostgreSQL's scan, and JSON.parse of columns is the cheapest way in.
  const res = await pool().query<{ spot_id: number; c: (number | null)[][] }>(
    `SELECT spot_id, json_build_array(array_agg((extract(epoch FROM hour) * 1000)::float8 ORDER BY hour),
        array_agg(t_n ORDER BY hour), array_agg(t_min ORDER BY hour), array_agg(t_max ORDER BY hour), array_agg(t_sum ORDER BY hour),
        array_agg(h_n ORDER BY hour), array_agg(h_min ORDER BY hour), array_agg(h_max ORDER BY hour), array_agg(h_sum ORDER BY hour),
        array_agg(dp_margin_min ORDER BY hour), array_agg(lux_n ORDER BY hour), array_agg(lux_sum ORDER BY hour),
        array_agg(dp_n ORDER BY hour), array_agg(dp_under_n ORDER BY hour), array_agg(lux_max ORDER BY hour)) AS c
     FROM hourly_rollups WHERE spot_id = ANY($1::int[]) AND hour >= $2 AND hour < $3 GROUP BY spot_id`,
    [spotIds, from, to],
  );
  const out = new Map<number, HourlyRollup[]>(spotIds.map((id) => [id, []]));
  for (const { spot_id, c } of res.rows) {
    const [hour, tN, tMin, tMax, tSum, hN, hMin, hMax, hSum, dp, luxN, luxSum, dpN, dpUnderN, luxMax] = c;
    const list = out.get(spot_id)!;
    for (let i = 0; i < hour.length; i++) {
      list.push({
        hour: new Date(hour[i]!),
        tN: tN[i] ?? 0,
        tMin: tMin[i],
        tMax: tMax[i],
        tSum: tSum[i],
        hN: hN[i] ?? 0,
        hMin: hMin[i],
        hMax: hMax[i],
        hSum: hSum[i],
        dpMarginMin: dp[i],
        luxN: luxN[i] ?? 0,
        luxSum: luxSum[i],
        luxMax: luxMax[i],
        dpN: dpN[i] ?? 0,
        dpUnderN: dpUnderN[i] ?? 0,
      });
    }
  }
  return out;
}

// Past hours rarely change, so each spot's rollups up to two hours ago are kept in memory. Every
// statement that changes a past hour's rollup logs the spot in rollup_changes (a trigger, see
// drizzle/0004), and each use compares the spot's log with the one seen when the rows were read:
// a late reading, a moved sensor or a new calibration makes it read the spot again. The log is
// compared by count and lowest and highest id, so a change committed out of id order, or the
// oldest entries pruned, still shows. The last two hours are always read fresh, and as the clock
// moves on only the newly past hours are read and appended.
//
// A rolling period (one that reaches the last two hours) is kept under the spot's id; a period that
// ended (a past year judged by the verdict, a compare period) under the spot and its bounds, so
// pages judging different periods of one spot don't push each other's rows out.
type CachedRollups = { from: number; edge: number; check: string; rows: HourlyRollup[] };
type CacheKey = number | string;
/**
 * Bounded by rows, not spots: a spot-year is 8,760 rows, about 1.5 MB, so this holds 64 spot-years
 * (about 100 MB) and more spots with less history. Least recently used spots go first.
 */
const MAX_CACHED_ROWS = 64 * 8760;
const rollupCache = new LRUCache<CacheKey, CachedRollups>({
  maxSize: MAX_CACHED_ROWS,
  sizeCalculation: (e) => Math.max(1, e.rows.length),
});
/** What the cache did since the process started: spots served from it whole, appended to, read afresh. */
const rollupCacheCounts = { hits: 0, appended: 0, read: 0 };

/** The cache's counts and keys, and a cached entry's rows (tests, the health page). */
export const rollupCacheState = {
  counts: (): Readonly<typeof rollupCacheCounts> => ({ ...rollupCacheCounts }),
  keys: (): CacheKey[] => [...rollupCache.keys()],
  rows: (key: CacheKey): HourlyRollup[] | undefined => rollupCache.peek(key)?.rows,
};

/** Forget week-old entries of the change log; the cache's check notices the pruning as a change. */
export async function pruneRollupChanges() {
  await pool().query("DELETE FROM rollup_changes WHERE changed_at < now() - interval '7 days'");
}

/** Index of the first row at or after `ms` (rows in hour order). */
function firstAtOrAfter(rows: HourlyRollup[], ms: number): number {
  let lo = 0,
    hi = rows.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (rows[mid].hour.getTime() < ms) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

export async function loadRollups(spotIds: number[], fromAsked: Date, to: Date): Promise<Map<number, HourlyRollup[]>> {
  // Local hours start on a quarter hour in every zone, so rounding `from` up to one selects the
  // same rows.
  const from = Math.ceil(fromAsked.getTime() / 900_000) * 900_000;
  const edge = Math.min(to.getTime(), Math.floor(Date.now() / 3_600_000) * 3_600_000 - 2 * 3_600_000);
  if (edge <= from) return fetchRollups(spotIds, new Date(from), to);
  const ended = edge === to.getTime();
  const keyOf = (spotId: number): CacheKey => (ended ? `${spotId}:${from}:${edge}` : spotId);
  const checks = await pool().query<{ spot_id: number; check: string }>(
    `SELECT s AS spot_id, (SELECT count(*) || ':' || coalesce(min(id), 0) || ':' || coalesce(max(id), 0)
      FROM rollup_changes WHERE spot_id = s) AS check
     FROM unnest($1::int[]) s`,
    [spotIds],
  );
  const stale: { spotId: number; check: string }[] = [];
  const behind = new Map<number, { spotId: number; hit: CachedRollups }[]>(); // by the edge they were read to
  const whole = new Map<number, CachedRollups>(); // served from the cache as they are
  for (const { spot_id: spotId, check } of checks.rows) {
    const hit = rollupCache.get(keyOf(spotId));
    if (!hit || hit.check !== check || hit.from > from || hit.edge <= from) stale.push({ spotId, check });
    else if (hit.edge < edge) behind.set(hit.edge, [...(behind.get(hit.edge) ?? []), { spotId, hit }]);
    else whole.set(spotId, hit);
  }
  const used = new Map<number, CachedRollups>();
  // The spot just used is in `used` even if the cache would not take it (alone over the bound): this
  // request reads it.
  const remember = (spotId: number, entry: CachedRollups) => {
    used.set(spotId, entry);
    rollupCache.set(keyOf(spotId), entry);
  };
  for (const [id, hit] of whole) remember(id, hit);
  rollupCacheCounts.hits += whole.size;
  for (const list of behind.values()) for (const { spotId, hit } of list) used.set(spotId, hit);
  if (stale.length > 0) {
    rollupCacheCounts.read += stale.length;
    const fresh = await fetchRollups(
      stale.map((c) => c.spotId),
      new Date(from),
      new Date(edge),
    );
    for (const c of stale) remember(c.spotId, { from, edge, check: c.check, rows: fresh.get(c.spotId)! });
  }
  for (const [readTo, list] of behind) {
    rollupCacheCounts.appended += list.length;
    const more = await fetchRollups(
      list.map((l) => l.spotId),
      new Date(readTo),
      new Date(edge),
    );
    // Appending newly past hours also drops those before this period: a rolling window would
    // otherwise keep every hour since the server started.
    for (const { spotId, hit } of list)
      remember(spotId, {
        ...hit,
        from,
        edge,
        rows: [...hit.rows.slice(firstAtOrAfter(hit.rows, from)), ...more.get(spotId)!],
      });
  }
  const recent =
    edge < to.getTime() ? await fetchRollups(spotIds, new Date(edge), to) : new Map<number, HourlyRollup[]>();
  return new Map(
    spotIds.map((id) => {
      const { rows } = used.get(id)!;
      const past = rows.slice(firstAtOrAfter(rows, from), firstAtOrAfter(rows, edge));
      return [id, [...past, ...(recent.get(id) ?? [])]];
    }),
  );
}
