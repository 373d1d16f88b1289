CREATE TABLE "forecast_warnings" (
	"id" serial PRIMARY KEY NOT NULL,
	"spot_id" integer NOT NULL,
	"night" date NOT NULL,
	"plant_name" text NOT NULL,
	"damage_c" real NOT NULL,
	"likely_c" real NOT NULL,
	"expected_low_c" real NOT NULL,
	"lower_bound_c" real NOT NULL,
	"leaf_low_c" real,
	"low_at" timestamp with time zone NOT NULL,
	"forecast_at" timestamp with time zone,
	"opened_at" timestamp with time zone NOT NULL,
	"notified_at" timestamp with time zone,
	"cleared_at" timestamp with time zone,
	"clear_notified_at" timestamp with time zone,
	"ended_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "forecast_warnings" ADD CONSTRAINT "forecast_warnings_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "forecast_warnings_spot_id_night_index" ON "forecast_warnings" USING btree ("spot_id","night");