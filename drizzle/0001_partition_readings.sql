-- Readings are partitioned by month of measured_at, so a year of one-minute data for dozens of
-- sensors stays quick to write, and old months can be pruned or detached whole. Drizzle-kit cannot
-- express partitioning, so the table it created in 0000 is replaced here (it is empty at this point).
DROP TABLE "readings";--> statement-breakpoint
CREATE TABLE "readings" (
	"sensor_id" integer NOT NULL,
	"measured_at" timestamp with time zone NOT NULL,
	"temperature" real,
	"humidity" real,
	"lux" real,
	"battery" real,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "readings_sensor_id_measured_at_pk" PRIMARY KEY("sensor_id","measured_at")
) PARTITION BY RANGE ("measured_at");--> statement-breakpoint
-- Catches anything outside the monthly partitions made ahead of time, so an insert never fails.
CREATE TABLE "readings_default" PARTITION OF "readings" DEFAULT;--> statement-breakpoint
-- Creates the monthly partitions covering [from_month, from_month + months). Rows already sitting in
-- the default partition for such a month are moved into the new partition.
CREATE OR REPLACE FUNCTION ensure_reading_partitions(from_month timestamptz, months integer)
RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  m timestamptz := date_trunc('month', from_month AT TIME ZONE 'UTC') AT TIME ZONE 'UTC';
  stop timestamptz := m + make_interval(months => months);
  part text;
  moved integer;
BEGIN
  WHILE m < stop LOOP
    part := 'readings_' || to_char(m AT TIME ZONE 'UTC', 'YYYY_MM');
    IF to_regclass(part) IS NULL THEN
      CREATE TEMP TABLE IF NOT EXISTS _moving (LIKE readings) ON COMMIT DROP;
      WITH d AS (
        DELETE FROM readings_default
        WHERE measured_at >= m AND measured_at < m + interval '1 month'
        RETURNING *
      ) INSERT INTO _moving SELECT * FROM d;
      GET DIAGNOSTICS moved = ROW_COUNT;
      EXECUTE format('CREATE TABLE %I PARTITION OF readings FOR VALUES FROM (%L) TO (%L)',
        part, m, m + interval '1 month');
      IF moved > 0 THEN
        INSERT INTO readings SELECT * FROM _moving;
      END IF;
      DELETE FROM _moving;
    END IF;
    m := m + interval '1 month';
  END LOOP;
END $$;--> statement-breakpoint
-- Air temperature minus dew point, Magnus form with the Alduchov & Eskridge (1996) constants over
-- water; the same formula as app/domain/climate/psychro.ts, so rollups and pages agree.
CREATE OR REPLACE FUNCTION dew_point_margin(t double precision, rh double precision)
RETURNS double precision LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
  SELECT CASE WHEN t IS NULL OR rh IS NULL OR rh <= 0 THEN NULL ELSE
    t - (243.04 * (ln(least(rh, 100) / 100) + 17.625 * t / (243.04 + t)))
          / (17.625 - (ln(least(rh, 100) / 100) + 17.625 * t / (243.04 + t)))
  END
$$;--> statement-breakpoint
SELECT ensure_reading_partitions(date_trunc('month', now()) - interval '24 months', 30);
