// Rebuilds the hourly rollups of whole spots from raw readings: after a sensor is moved, a
// placement edited or a calibration changed. The table lock waits for writer batches in flight
// and holds new ones back until the rebuild commits, so no reading is counted twice or lost.
import { calibratedSql } from "~/.server/ingest/calibrated";
import { pool } from "~/.server/db";
import { DP_COUNTS, LOCAL_HOUR_START } from "~/.server/ingest/writer";

export const REBUILD_SQL = `
INSERT INTO hourly_rollups (spot_id, hour, t_n, t_min, t_max, t_sum, h_n, h_min, h_max, h_sum, dp_margin_min, lux_n, lux_sum, dp_n, dp_under_n)
SELECT spot_id, hour, count(t)::int, min(t), max(t), sum(t), count(h)::int, min(h), max(h), sum(h),
  min(dew_point_margin(t, h)), count(l)::int, sum(l), ${DP_COUNTS("dew_point_margin(t, h)")}
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

export async function rebuildRollups(spotIds: number[]) {
  const ids = [...new Set(spotIds)];
  if (ids.length === 0) return;
  const client = await pool().connect();
  try {
    await client.query("BEGIN");
    await client.query("LOCK TABLE hourly_rollups IN SHARE ROW EXCLUSIVE MODE");
    await client.query("DELETE FROM hourly_rollups WHERE spot_id = ANY($1::int[])", [ids]);
    await client.query(REBUILD_SQL, [ids]);
    await client.query("COMMIT");
  } catch (err) {
    await client.query("ROLLBACK").catch(() => {});
    throw err;
  } finally {
    client.release();
  }
}

/** Spots a sensor has ever been placed in (all of them are affected by its calibration). */
export async function spotsOfSensor(sensorId: number): Promise<number[]> {
  const res = await pool().query<{ spot_id: number }>("SELECT DISTINCT spot_id FROM placements WHERE sensor_id = $1", [sensorId]);
  return res.rows.map((r) => r.spot_id);
}
