CREATE TYPE "public"."glazing" AS ENUM('single', 'double', 'old_double', 'triple', 'none');--> statement-breakpoint
CREATE TYPE "public"."light_source" AS ENUM('sun', 'led', 'fluorescent', 'mixed');--> statement-breakpoint
ALTER TABLE "hourly_rollups" ADD COLUMN "lux_max" double precision;--> statement-breakpoint
ALTER TABLE "spots" ADD COLUMN "light_source" "light_source" DEFAULT 'sun' NOT NULL;--> statement-breakpoint
ALTER TABLE "spots" ADD COLUMN "glazing" "glazing";