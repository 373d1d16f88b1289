
WITH input AS (
  SELECT sensor_id, to_timestamp(ms / 1000) AS measured_at, temperature, humidity, lux, battery FROM unnest($1::int[], $2::float8[], $3::real[], $4::real[], $5::real[], $6::real[])
    AS u(sensor_id, ms, temperature, humidity, lux, battery)
), ins AS (
  INSERT INTO readings (sensor_id, measured_at, temperature, humidity, lux, battery)
  SELECT * FROM input 
  RETURNING sensor_id, measured_at, temperature, humidity, lux, battery
), fresh AS (SELECT * FROM ins), placed AS (
  SELECT p.spot_id, f.sensor_id, f.measured_at, f.battery, si.time_zone,
    (f.temperature + coalesce((s.calibration->>'temperature')::real, 0)) AS t,
    (CASE WHEN f.humidity IS NOT NULL THEN least(100, greatest(0, f.humidity + coalesce((s.calibration->>'humidity')::real, 0))) END) AS h,
    (CASE WHEN f.lux IS NOT NULL THEN greatest(0, f.lux + coalesce((s.calibration->>'lux')::real, 0)) END) AS l,
    (f.measured_at - ((f.measured_at AT TIME ZONE si.time_zone) - date_trunc('hour', f.measured_at AT TIME ZONE si.time_zone))) AS hour
  FROM fresh f
  JOIN placements p ON p.sensor_id = f.sensor_id AND p.from_at <= f.measured_at
    AND (p.to_at IS NULL OR f.measured_at < p.to_at)
  JOIN sensors s ON s.id = f.sensor_id
  JOIN spots sp ON sp.id = p.spot_id
  JOIN sites si ON si.id = sp.site_id
), agg AS (
  SELECT spot_id, hour,
    count(t)::int AS t_n, min(t) AS t_min, max(t) AS t_max, sum(t) AS t_sum,
    count(h)::int AS h_n, min(h) AS h_min, max(h) AS h_max, sum(h) AS h_sum,
    min(dew_point_margin(t, h)) AS dp_margin_min, count(l)::int AS lux_n, sum(l) AS lux_sum, max(l) AS lux_max,
    count(dew_point_margin(t, h))::int AS dp_n, (count(*) FILTER (WHERE dew_point_margin(t, h) < 2))::int AS dp_under_n
  FROM placed GROUP BY spot_id, hour
), up AS (
  INSERT INTO hourly_rollups AS r (spot_id, hour, t_n, t_min, t_max, t_sum, h_n, h_min, h_max, h_sum, dp_margin_min, lux_n, lux_sum, lux_max, dp_n, dp_under_n)
  SELECT * FROM agg ORDER BY spot_id, hour -- one lock order for every writer, so no deadlocks
  ON CONFLICT (spot_id, hour) DO UPDATE SET
    t_n = r.t_n + excluded.t_n, t_min = least(r.t_min, excluded.t_min), t_max = greatest(r.t_max, excluded.t_max),
    t_sum = CASE WHEN r.t_sum IS NULL THEN excluded.t_sum ELSE r.t_sum + coalesce(excluded.t_sum, 0) END,
    h_n = r.h_n + excluded.h_n, h_min = least(r.h_min, excluded.h_min), h_max = greatest(r.h_max, excluded.h_max),
    h_sum = CASE WHEN r.h_sum IS NULL THEN excluded.h_sum ELSE r.h_sum + coalesce(excluded.h_sum, 0) END,
    dp_margin_min = least(r.dp_margin_min, excluded.dp_margin_min),
    dp_n = r.dp_n + excluded.dp_n, dp_under_n = r.dp_under_n + excluded.dp_under_n,
    lux_n = r.lux_n + excluded.lux_n,
    lux_sum = CASE WHEN r.lux_sum IS NULL THEN excluded.lux_sum ELSE r.lux_sum + coalesce(excluded.lux_sum, 0) END,
    lux_max = greatest(r.lux_max, excluded.lux_max)
  RETURNING 1
), seen AS (
  UPDATE sensors s SET last_seen_at = greatest(s.last_seen_at, x.last_at),
    battery = coalesce(x.battery, s.battery)
  FROM (
    SELECT sensor_id, max(measured_at) AS last_at,
      (array_agg(battery ORDER BY measured_at DESC) FILTER (WHERE battery IS NOT NULL))[1] AS battery
    FROM input GROUP BY sensor_id
  ) x
  WHERE s.id = x.sensor_id AND (s.last_seen_at IS NULL OR x.last_at >= s.last_seen_at)
  RETURNING 1
)
SELECT (SELECT count(*)::int FROM ins) AS inserted, (SELECT count(*)::int FROM up) AS hours,
  NULL::json AS conflicts,
  greatest(0, (SELECT count(*) FROM fresh) - (SELECT count(*) FROM placed))::int AS outside,
  (SELECT count(*)::int FROM seen) AS seen,
  '[]'::json AS placed