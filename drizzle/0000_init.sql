CREATE TYPE "public"."alert_kind" AS ENUM('cold', 'heat', 'dry', 'condensation', 'silent', 'battery');--> statement-breakpoint
CREATE TYPE "public"."window_facing" AS ENUM('N', 'NE', 'E', 'SE', 'S', 'SW', 'W', 'NW', 'none');--> statement-breakpoint
CREATE TYPE "public"."site_role" AS ENUM('owner', 'carer', 'mentor');--> statement-breakpoint
CREATE TABLE "alert_events" (
	"id" serial PRIMARY KEY NOT NULL,
	"rule_id" integer NOT NULL,
	"spot_id" integer NOT NULL,
	"kind" "alert_kind" NOT NULL,
	"started_at" timestamp with time zone NOT NULL,
	"ended_at" timestamp with time zone,
	"peak" real,
	"acknowledged_by" integer,
	"acknowledged_at" timestamp with time zone,
	"notified_at" timestamp with time zone,
	"clear_notified_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "alert_rules" (
	"id" serial PRIMARY KEY NOT NULL,
	"spot_id" integer NOT NULL,
	"kind" "alert_kind" NOT NULL,
	"threshold" real NOT NULL,
	"duration_minutes" integer DEFAULT 15 NOT NULL,
	"hysteresis" real DEFAULT 1 NOT NULL,
	"clear_minutes" integer DEFAULT 30 NOT NULL,
	"early_warning" boolean DEFAULT false NOT NULL,
	"paused" boolean DEFAULT false NOT NULL,
	"reason" text DEFAULT '' NOT NULL,
	"pending_since" timestamp with time zone,
	"clearing_since" timestamp with time zone,
	"warned_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "audit_log" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"site_id" integer,
	"actor_id" integer,
	"action" text NOT NULL,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "custom_plants" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"key" text NOT NULL,
	"based_on" text,
	"profile" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "hourly_rollups" (
	"spot_id" integer NOT NULL,
	"hour" timestamp with time zone NOT NULL,
	"t_n" integer DEFAULT 0 NOT NULL,
	"t_min" real,
	"t_max" real,
	"t_sum" double precision,
	"h_n" integer DEFAULT 0 NOT NULL,
	"h_min" real,
	"h_max" real,
	"h_sum" double precision,
	"dp_margin_min" real,
	"lux_n" integer DEFAULT 0 NOT NULL,
	"lux_sum" double precision,
	CONSTRAINT "hourly_rollups_spot_id_hour_pk" PRIMARY KEY("spot_id","hour")
);
--> statement-breakpoint
CREATE TABLE "memberships" (
	"user_id" integer NOT NULL,
	"site_id" integer NOT NULL,
	"role" "site_role" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "memberships_user_id_site_id_pk" PRIMARY KEY("user_id","site_id")
);
--> statement-breakpoint
CREATE TABLE "notes" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"spot_id" integer,
	"plant_key" text,
	"author_id" integer,
	"body" text NOT NULL,
	"resolved_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "placements" (
	"id" serial PRIMARY KEY NOT NULL,
	"sensor_id" integer NOT NULL,
	"spot_id" integer NOT NULL,
	"from_at" timestamp with time zone NOT NULL,
	"to_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"sensor_id" integer NOT NULL,
	"measured_at" timestamp with time zone NOT NULL,
	"temperature" real,
	"humidity" real,
	"lux" real,
	"battery" real,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "readings_sensor_id_measured_at_pk" PRIMARY KEY("sensor_id","measured_at")
);
--> statement-breakpoint
CREATE TABLE "rejected_messages" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"sensor_id" integer,
	"source" text NOT NULL,
	"topic" text,
	"reason" text NOT NULL,
	"payload" text NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sensors" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"name" text NOT NULL,
	"secret_hash" text NOT NULL,
	"channels" text[] DEFAULT '{temperature,humidity}' NOT NULL,
	"calibration" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"last_seen_at" timestamp with time zone,
	"battery" real,
	"rejected_count" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"id" text PRIMARY KEY NOT NULL,
	"user_id" integer NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sign_in_failures" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"key" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"latitude" double precision NOT NULL,
	"longitude" double precision NOT NULL,
	"time_zone" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "spot_plants" (
	"id" serial PRIMARY KEY NOT NULL,
	"spot_id" integer NOT NULL,
	"plant_key" text NOT NULL,
	"nickname" text DEFAULT '' NOT NULL,
	"pots" integer DEFAULT 1 NOT NULL,
	"added_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "spots" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"name" text NOT NULL,
	"indoor" boolean NOT NULL,
	"facing" "window_facing" DEFAULT 'none' NOT NULL,
	"capacity" integer DEFAULT 0 NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" serial PRIMARY KEY NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"password_hash" text NOT NULL,
	"is_admin" boolean DEFAULT false NOT NULL,
	"temperature_unit" text DEFAULT 'C' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "users_email_unique" UNIQUE("email")
);
--> statement-breakpoint
CREATE TABLE "water_checks" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"source" text NOT NULL,
	"checked_on" timestamp with time zone NOT NULL,
	"ppm" real,
	"ph" real,
	"ec" real,
	"ec_scale" real,
	"by_user_id" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "wishlist" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"plant_key" text NOT NULL,
	"must_have" boolean DEFAULT false NOT NULL,
	"pots" integer DEFAULT 1 NOT NULL,
	"added_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "alert_events" ADD CONSTRAINT "alert_events_rule_id_alert_rules_id_fk" FOREIGN KEY ("rule_id") REFERENCES "public"."alert_rules"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alert_events" ADD CONSTRAINT "alert_events_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alert_events" ADD CONSTRAINT "alert_events_acknowledged_by_users_id_fk" FOREIGN KEY ("acknowledged_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alert_rules" ADD CONSTRAINT "alert_rules_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_log" ADD CONSTRAINT "audit_log_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_log" ADD CONSTRAINT "audit_log_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custom_plants" ADD CONSTRAINT "custom_plants_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "hourly_rollups" ADD CONSTRAINT "hourly_rollups_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "placements" ADD CONSTRAINT "placements_sensor_id_sensors_id_fk" FOREIGN KEY ("sensor_id") REFERENCES "public"."sensors"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "placements" ADD CONSTRAINT "placements_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sensors" ADD CONSTRAINT "sensors_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spot_plants" ADD CONSTRAINT "spot_plants_spot_id_spots_id_fk" FOREIGN KEY ("spot_id") REFERENCES "public"."spots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spots" ADD CONSTRAINT "spots_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_checks" ADD CONSTRAINT "water_checks_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_checks" ADD CONSTRAINT "water_checks_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "wishlist" ADD CONSTRAINT "wishlist_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "alert_events_spot_id_started_at_index" ON "alert_events" USING btree ("spot_id","started_at");--> statement-breakpoint
CREATE INDEX "alert_rules_spot_id_index" ON "alert_rules" USING btree ("spot_id");--> statement-breakpoint
CREATE INDEX "audit_log_site_id_at_index" ON "audit_log" USING btree ("site_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "custom_plants_site_id_key_index" ON "custom_plants" USING btree ("site_id","key");--> statement-breakpoint
CREATE INDEX "memberships_site_id_index" ON "memberships" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "notes_site_id_index" ON "notes" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "placements_sensor_id_from_at_index" ON "placements" USING btree ("sensor_id","from_at");--> statement-breakpoint
CREATE INDEX "placements_spot_id_index" ON "placements" USING btree ("spot_id");--> statement-breakpoint
CREATE INDEX "rejected_messages_at_index" ON "rejected_messages" USING btree ("at");--> statement-breakpoint
CREATE INDEX "rejected_messages_reason_index" ON "rejected_messages" USING btree ("reason");--> statement-breakpoint
CREATE INDEX "sensors_site_id_index" ON "sensors" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "sessions_user_id_index" ON "sessions" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "sign_in_failures_key_at_index" ON "sign_in_failures" USING btree ("key","at");--> statement-breakpoint
CREATE INDEX "spot_plants_spot_id_index" ON "spot_plants" USING btree ("spot_id");--> statement-breakpoint
CREATE INDEX "spots_site_id_index" ON "spots" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "water_checks_site_id_checked_on_index" ON "water_checks" USING btree ("site_id","checked_on");--> statement-breakpoint
CREATE UNIQUE INDEX "wishlist_site_id_plant_key_index" ON "wishlist" USING btree ("site_id","plant_key");