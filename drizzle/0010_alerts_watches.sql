-- "watch" in the UI is the watches table (alert_rules before): renamed in place, rows, ids and events kept.
ALTER TABLE "alert_rules" RENAME TO "watches";--> statement-breakpoint
ALTER SEQUENCE "alert_rules_id_seq" RENAME TO "watches_id_seq";--> statement-breakpoint
ALTER TABLE "watches" RENAME CONSTRAINT "alert_rules_pkey" TO "watches_pkey";--> statement-breakpoint
ALTER TABLE "alert_events" RENAME CONSTRAINT "alert_events_rule_id_alert_rules_id_fk" TO "alert_events_rule_id_watches_id_fk";--> statement-breakpoint
ALTER TABLE "watches" RENAME CONSTRAINT "alert_rules_spot_id_spots_id_fk" TO "watches_spot_id_spots_id_fk";--> statement-breakpoint
ALTER INDEX "alert_rules_spot_id_index" RENAME TO "watches_spot_id_index";
