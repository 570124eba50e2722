ALTER TABLE "scan_windows" ADD COLUMN "angle_deg" jsonb;--> statement-breakpoint
ALTER TABLE "alert_notifications" ADD CONSTRAINT "alert_notifications_once" UNIQUE("alert_id","person_id","event");--> statement-breakpoint
ALTER TABLE "alerts" ADD CONSTRAINT "alerts_track_kind_opened_unique" UNIQUE("track_id","kind","opened_at");