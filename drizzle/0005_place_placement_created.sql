ALTER TABLE "placements" ADD COLUMN "created_at" timestamp with time zone DEFAULT now() NOT NULL;--> statement-breakpoint
-- Placements made before this column existed keep counting silence from their start, as they did.
UPDATE "placements" SET "created_at" = "from_at";
