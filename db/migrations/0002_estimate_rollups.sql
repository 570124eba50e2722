CREATE TABLE "estimate_rollups" (
	"track_id" integer NOT NULL,
	"span_seconds" integer NOT NULL,
	"start" timestamp with time zone NOT NULL,
	"count" integer NOT NULL,
	"natural_count" integer NOT NULL,
	"frequency_sum" double precision NOT NULL,
	"natural_frequency_sum" double precision NOT NULL,
	"damping_min" double precision,
	"damping_max" double precision,
	"damping_sum" double precision NOT NULL,
	"damping_lo_sum" double precision NOT NULL,
	"damping_lo_count" integer NOT NULL,
	"damping_hi_sum" double precision NOT NULL,
	"damping_hi_count" integer NOT NULL,
	CONSTRAINT "estimate_rollups_track_id_span_seconds_start_pk" PRIMARY KEY("track_id","span_seconds","start"),
	CONSTRAINT "estimate_rollups_span_check" CHECK ("estimate_rollups"."span_seconds" in (600, 3600, 86400)),
	CONSTRAINT "estimate_rollups_count_check" CHECK ("estimate_rollups"."count" > 0 and "estimate_rollups"."natural_count" >= 0 and "estimate_rollups"."natural_count" <= "estimate_rollups"."count")
);
--> statement-breakpoint
ALTER TABLE "estimate_rollups" ADD CONSTRAINT "estimate_rollups_track_id_mode_tracks_id_fk" FOREIGN KEY ("track_id") REFERENCES "public"."mode_tracks"("id") ON DELETE cascade ON UPDATE no action;