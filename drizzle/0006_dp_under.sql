ALTER TABLE "hourly_rollups" ADD COLUMN "dp_n" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "hourly_rollups" ADD COLUMN "dp_under_n" integer DEFAULT 0 NOT NULL;