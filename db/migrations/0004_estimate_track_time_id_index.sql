DROP INDEX "mode_estimates_track_at_idx";--> statement-breakpoint
CREATE INDEX "mode_estimates_track_at_id_idx" ON "mode_estimates" USING btree ("track_id","at","id");