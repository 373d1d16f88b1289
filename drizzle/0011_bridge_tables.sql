CREATE TABLE "bridge_links" (
	"id" serial PRIMARY KEY NOT NULL,
	"bridge_id" integer NOT NULL,
	"sensor_id" integer NOT NULL,
	"topic" text NOT NULL,
	"device" text DEFAULT '' NOT NULL,
	"mapping" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "bridges" (
	"id" serial PRIMARY KEY NOT NULL,
	"site_id" integer NOT NULL,
	"url" text NOT NULL,
	"username" text,
	"password" text,
	"ca_cert" text,
	"protocol_version" smallint DEFAULT 4 NOT NULL,
	"client_id" text NOT NULL,
	"enabled" boolean DEFAULT true NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "bridges_siteId_unique" UNIQUE("site_id")
);
--> statement-breakpoint
ALTER TABLE "bridge_links" ADD CONSTRAINT "bridge_links_bridge_id_bridges_id_fk" FOREIGN KEY ("bridge_id") REFERENCES "public"."bridges"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bridge_links" ADD CONSTRAINT "bridge_links_sensor_id_sensors_id_fk" FOREIGN KEY ("sensor_id") REFERENCES "public"."sensors"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bridges" ADD CONSTRAINT "bridges_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "bridge_links_bridge_id_topic_device_index" ON "bridge_links" USING btree ("bridge_id","topic","device");--> statement-breakpoint
CREATE INDEX "bridge_links_sensor_id_index" ON "bridge_links" USING btree ("sensor_id");