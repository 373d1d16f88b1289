// Rebuilds the hourly rollups of whole spots from raw readings: after a sensor is moved, a
// placement edited or a calibration changed. The table lock waits for writer batches in flight
// and holds new ones back until the rebuild commits, so no reading is counted twice or lost.
import { calibratedSql } from "~/.server/ingest/calibrated";
import { pool } from "~/.server/db";
import { DP_COUNTS, LOCAL_HOUR_START } from "~/.server/rollups/sql";

export const REBUILD_SQL = `
INSERT INTO hourly_rollups (spot_id, hour, t_n, t_min, t_max, t_sum, h_n, h_min, h_max, h_sum, dp_margin_min, lux_n, lux_sum, lux_max, dp_n, dp_under_n)
SELECT spot_id, hour, count(t)::int, min(t), max(t), sum(t), count(h)::int, min(h), max(h), sum(h),
  min(dew_point_margin(t, h)), count(l)::int, sum(l), max(l), ${DP_COUNTS("dew_point_margin(t, h)")}
FROM (
  SELECT p.spot_id,
    ${LOCAL_HOUR_START("r.measured_at", "si.time_zone")} AS hour,
    ${calibratedSql("temperature", "r.temperature")} AS t,
    ${calibratedSql("humidity", "r.humidity")} AS h,
    ${calibratedSql("lux", "r.lux")} AS l
  FROM placements p
  JOIN readings r ON r.sensor_id = p.sensor_id AND r.measured_at >= p.from_at
    AND (p.to_at IS NULL OR r.measured_at < p.to_at)
  JOIN sensors s ON s.id = p.sensor_id
  JOIN spots sp ON sp.id = p.spot_id
  JOIN sites si ON si.id = sp.site_id
  WHERE p.spot_id = ANY($1::int[])
) x
GROUP BY spot_id, hour`;

/** Anything that runs plain SQL: a pool client, or a Drizzle transaction through `rawExecutor`. */
export type SqlRunner = { query(text: string, values?: unknown[]): Promise<unknown> };

/**
 * Rebuilds the spots' rollups inside the caller's transaction, so a change to placements or a
 * calibration and the rollups it implies commit together (or not at all). Take it last in the
 * transaction: the lock holds the writer back until COMMIT.
 */
export async function rebuildRollupsIn(run: SqlRunner, spotIds: number[]) {
  const ids = [...new Set(spotIds)];
  if (ids.length === 0) return;
  await run.query("LOCK TABLE hourly_rollups IN SHARE ROW EXCLUSIVE MODE");
  await run.query("DELETE FROM hourly_rollups WHERE spot_id = ANY($1::int[])", [ids]);
  await run.query(REBUILD_SQL, [ids]);
}

/** Rebuilds the spots' rollups in a transaction of its own. */
export async function rebuildRollups(spotIds: number[]) {
  if (spotIds.length === 0) return;
  const client = await pool().connect();
  try {
    await client.query("BEGIN");
    await rebuildRollupsIn(client, spotIds);
    await client.query("COMMIT");
  } catch (err) {
    await client.query("ROLLBACK").catch(() => {});
    throw err;
  } finally {
    client.release();
  }
}
