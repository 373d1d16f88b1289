CREATE TABLE "rollup_changes" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"spot_id" integer NOT NULL,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "rollup_changes_spot_id_id_index" ON "rollup_changes" USING btree ("spot_id","id");--> statement-breakpoint
-- Hand-written: log which spots' past hours change, from every statement that writes the rollups.
-- Hours less than an hour old are left out (the rollup cache never holds hours under two hours
-- old, and this keeps live writes from logging anything). One row per spot and statement.
CREATE FUNCTION log_past_rollup_changes() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO rollup_changes (spot_id)
  SELECT DISTINCT spot_id FROM changed WHERE hour < clock_timestamp() - interval '1 hour';
  RETURN NULL;
END $$;
--> statement-breakpoint
CREATE TRIGGER hourly_rollups_log_insert AFTER INSERT ON hourly_rollups
  REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION log_past_rollup_changes();
--> statement-breakpoint
-- Updates come from the writer's upsert and never change a row's spot or hour, so the new rows say
-- which spots changed.
CREATE TRIGGER hourly_rollups_log_update AFTER UPDATE ON hourly_rollups
  REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION log_past_rollup_changes();
--> statement-breakpoint
CREATE TRIGGER hourly_rollups_log_delete AFTER DELETE ON hourly_rollups
  REFERENCING OLD TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION log_past_rollup_changes();
