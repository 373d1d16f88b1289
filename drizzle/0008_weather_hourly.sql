CREATE TABLE "weather_days" (
	"site_id" integer NOT NULL,
	"day" date NOT NULL,
	"temperature" smallint[] NOT NULL,
	"humidity" smallint[] NOT NULL,
	"cloud" smallint[] NOT NULL,
	"wind" smallint[] NOT NULL,
	"shortwave" smallint[] NOT NULL,
	"forecast" boolean DEFAULT false NOT NULL,
	CONSTRAINT "weather_days_site_id_day_pk" PRIMARY KEY("site_id","day")
);
--> statement-breakpoint
CREATE TABLE "weather_fetches" (
	"site_id" integer PRIMARY KEY NOT NULL,
	"latitude" double precision NOT NULL,
	"longitude" double precision NOT NULL,
	"archive_from" date,
	"archive_to" date,
	"forecast_at" timestamp with time zone,
	"failures" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone,
	"last_error" text
);
--> statement-breakpoint
ALTER TABLE "weather_days" ADD CONSTRAINT "weather_days_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "weather_fetches" ADD CONSTRAINT "weather_fetches_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;