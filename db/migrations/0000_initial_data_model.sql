CREATE TABLE "alert_notifications" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "alert_notifications_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"alert_id" integer NOT NULL,
	"person_id" integer NOT NULL,
	"event" text NOT NULL,
	"sent_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "alert_notifications_event_check" CHECK (event in ('opened', 'escalated', 'cleared'))
);
--> statement-breakpoint
CREATE TABLE "alerts" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "alerts_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"track_id" integer NOT NULL,
	"kind" text NOT NULL,
	"state" text DEFAULT 'open' NOT NULL,
	"level" integer DEFAULT 1 NOT NULL,
	"opened_at" timestamp with time zone NOT NULL,
	"escalated_at" timestamp with time zone,
	"cleared_at" timestamp with time zone,
	"worst_damping" double precision,
	"worst_estimate_id" bigint,
	"acknowledged_by" integer,
	"acknowledged_at" timestamp with time zone,
	"note" text,
	CONSTRAINT "alerts_kind_check" CHECK (kind in ('poor', 'forced')),
	CONSTRAINT "alerts_state_check" CHECK (state in ('open', 'acknowledged', 'cleared'))
);
--> statement-breakpoint
CREATE TABLE "analyses" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "analyses_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"kind" text NOT NULL,
	"recording_id" integer NOT NULL,
	"method" text,
	"settings" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"status" text DEFAULT 'queued' NOT NULL,
	"progress" double precision DEFAULT 0 NOT NULL,
	"error" text,
	"job_id" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	"timings" jsonb,
	CONSTRAINT "analyses_kind_check" CHECK (kind in ('scan', 'fit', 'ingest')),
	CONSTRAINT "analyses_status_check" CHECK (status in ('queued', 'running', 'done', 'failed')),
	CONSTRAINT "analyses_progress_check" CHECK ("analyses"."progress" >= 0 and "analyses"."progress" <= 1)
);
--> statement-breakpoint
CREATE TABLE "areas" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "areas_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"code" text NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	CONSTRAINT "areas_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "audit_log" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "audit_log_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"person_id" integer,
	"action" text NOT NULL,
	"target" text,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"ip" text,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "channels" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "channels_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"name" text NOT NULL,
	"site_id" integer NOT NULL,
	"pmu_id" integer,
	"kind" text NOT NULL,
	"unit" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	CONSTRAINT "channels_name_unique" UNIQUE("name"),
	CONSTRAINT "channels_kind_check" CHECK (kind in ('angle', 'frequency', 'flow', 'voltage')),
	CONSTRAINT "channels_unit_check" CHECK (unit in ('deg', 'Hz', 'MW', 'kV', 'pu'))
);
--> statement-breakpoint
CREATE TABLE "corridors" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "corridors_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"code" text NOT NULL,
	"name" text NOT NULL,
	"from_site_id" integer NOT NULL,
	"to_site_id" integer NOT NULL,
	"kv" double precision NOT NULL,
	"flow_channel_id" integer,
	"from_angle_channel_id" integer,
	"to_angle_channel_id" integer,
	CONSTRAINT "corridors_code_unique" UNIQUE("code"),
	CONSTRAINT "corridors_distinct_ends" CHECK ("corridors"."from_site_id" <> "corridors"."to_site_id")
);
--> statement-breakpoint
CREATE TABLE "fits" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "fits_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"analysis_id" integer NOT NULL,
	"from_time" timestamp with time zone NOT NULL,
	"to_time" timestamp with time zone NOT NULL,
	"method" text NOT NULL,
	"model_order" integer,
	"snr_db" double precision,
	"reconstruction" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "invitations" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "invitations_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"token_hash" text NOT NULL,
	"email" text NOT NULL,
	"role" text NOT NULL,
	"invited_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	"person_id" integer,
	CONSTRAINT "invitations_token_hash_unique" UNIQUE("token_hash"),
	CONSTRAINT "invitations_role_check" CHECK (role in ('admin', 'engineer', 'operator', 'planner'))
);
--> statement-breakpoint
CREATE TABLE "mode_estimates" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "mode_estimates_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"window_id" integer,
	"fit_id" integer,
	"track_id" integer,
	"at" timestamp with time zone NOT NULL,
	"frequency_hz" double precision NOT NULL,
	"damping_percent" double precision NOT NULL,
	"damping_lo" double precision,
	"damping_hi" double precision,
	"frequency_lo" double precision,
	"frequency_hi" double precision,
	"amplitude" double precision,
	"fit_quality" double precision,
	"method" text NOT NULL,
	"forced" boolean DEFAULT false NOT NULL,
	CONSTRAINT "mode_estimates_source" CHECK (("mode_estimates"."window_id" is null) <> ("mode_estimates"."fit_id" is null))
);
--> statement-breakpoint
CREATE TABLE "mode_shapes" (
	"estimate_id" bigint NOT NULL,
	"channel_id" integer NOT NULL,
	"magnitude" double precision NOT NULL,
	"angle_deg" double precision NOT NULL,
	CONSTRAINT "mode_shapes_estimate_id_channel_id_pk" PRIMARY KEY("estimate_id","channel_id")
);
--> statement-breakpoint
CREATE TABLE "mode_tracks" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "mode_tracks_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"code" text NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"min_hz" double precision NOT NULL,
	"max_hz" double precision NOT NULL,
	"poor_below" double precision DEFAULT 3 NOT NULL,
	"low_below" double precision DEFAULT 5 NOT NULL,
	"corridor_id" integer,
	"reference" jsonb DEFAULT '{"groupA":[],"groupB":[]}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "mode_tracks_code_unique" UNIQUE("code"),
	CONSTRAINT "mode_tracks_band" CHECK ("mode_tracks"."min_hz" < "mode_tracks"."max_hz"),
	CONSTRAINT "mode_tracks_thresholds" CHECK ("mode_tracks"."poor_below" < "mode_tracks"."low_below")
);
--> statement-breakpoint
CREATE TABLE "outbox_messages" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "outbox_messages_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"message_id" text,
	"from" text DEFAULT '' NOT NULL,
	"to" text DEFAULT '' NOT NULL,
	"subject" text DEFAULT '' NOT NULL,
	"text" text,
	"html" text,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "password_resets" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "password_resets_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"token_hash" text NOT NULL,
	"person_id" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	CONSTRAINT "password_resets_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "people" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "people_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"email" text NOT NULL,
	"display_name" text NOT NULL,
	"role" text NOT NULL,
	"password_hash" text NOT NULL,
	"disabled" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "people_email_unique" UNIQUE("email"),
	CONSTRAINT "people_role_check" CHECK (role in ('admin', 'engineer', 'operator', 'planner'))
);
--> statement-breakpoint
CREATE TABLE "pmus" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "pmus_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"code" text NOT NULL,
	"name" text NOT NULL,
	"site_id" integer NOT NULL,
	"reporting_rate" double precision NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	CONSTRAINT "pmus_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "recording_channels" (
	"recording_id" integer NOT NULL,
	"channel_id" integer NOT NULL,
	"source_name" text NOT NULL,
	"column_index" integer NOT NULL,
	"quality" jsonb,
	CONSTRAINT "recording_channels_recording_id_channel_id_pk" PRIMARY KEY("recording_id","channel_id")
);
--> statement-breakpoint
CREATE TABLE "recordings" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "recordings_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"file_name" text NOT NULL,
	"checksum" text NOT NULL,
	"format" text NOT NULL,
	"size_bytes" bigint,
	"start_time" timestamp with time zone,
	"end_time" timestamp with time zone,
	"rate" double precision,
	"channel_count" integer,
	"sample_count" integer,
	"status" text DEFAULT 'uploaded' NOT NULL,
	"uploaded_by" integer,
	"uploaded_at" timestamp with time zone DEFAULT now() NOT NULL,
	"error" text,
	"quality" jsonb,
	CONSTRAINT "recordings_checksum_unique" UNIQUE("checksum"),
	CONSTRAINT "recordings_format_check" CHECK (format in ('csv', 'comtrade-ascii', 'comtrade-binary')),
	CONSTRAINT "recordings_status_check" CHECK (status in ('uploaded', 'ingesting', 'ready', 'failed'))
);
--> statement-breakpoint
CREATE TABLE "sample_chunks" (
	"recording_id" integer NOT NULL,
	"channel_id" integer NOT NULL,
	"chunk_index" integer NOT NULL,
	"start_time" timestamp with time zone NOT NULL,
	"count" integer NOT NULL,
	"dtype" text NOT NULL,
	"values" "bytea" NOT NULL,
	CONSTRAINT "sample_chunks_recording_id_channel_id_chunk_index_pk" PRIMARY KEY("recording_id","channel_id","chunk_index"),
	CONSTRAINT "sample_chunks_dtype_check" CHECK (dtype in ('f32', 'f64')),
	CONSTRAINT "sample_chunks_count_check" CHECK ("sample_chunks"."count" > 0)
);
--> statement-breakpoint
CREATE TABLE "scan_windows" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "scan_windows_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"analysis_id" integer NOT NULL,
	"start_time" timestamp with time zone NOT NULL,
	"end_time" timestamp with time zone NOT NULL,
	"quality" jsonb,
	"transfer_mw" jsonb,
	CONSTRAINT "scan_windows_analysis_start_unique" UNIQUE("analysis_id","start_time")
);
--> statement-breakpoint
CREATE TABLE "session" (
	"sid" varchar PRIMARY KEY NOT NULL,
	"sess" json NOT NULL,
	"expire" timestamp (6) with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "sites_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"code" text NOT NULL,
	"name" text NOT NULL,
	"area_id" integer NOT NULL,
	"kv" double precision NOT NULL,
	"x" double precision NOT NULL,
	"y" double precision NOT NULL,
	CONSTRAINT "sites_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "track_subscriptions" (
	"person_id" integer NOT NULL,
	"track_id" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "track_subscriptions_person_id_track_id_pk" PRIMARY KEY("person_id","track_id")
);
--> statement-breakpoint
CREATE TABLE "transfer_studies" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "transfer_studies_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"name" text DEFAULT '' NOT NULL,
	"track_id" integer NOT NULL,
	"corridor_id" integer,
	"period_from" timestamp with time zone NOT NULL,
	"period_to" timestamp with time zone NOT NULL,
	"result" jsonb NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "alert_notifications" ADD CONSTRAINT "alert_notifications_alert_id_alerts_id_fk" FOREIGN KEY ("alert_id") REFERENCES "public"."alerts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alert_notifications" ADD CONSTRAINT "alert_notifications_person_id_people_id_fk" FOREIGN KEY ("person_id") REFERENCES "public"."people"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alerts" ADD CONSTRAINT "alerts_track_id_mode_tracks_id_fk" FOREIGN KEY ("track_id") REFERENCES "public"."mode_tracks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alerts" ADD CONSTRAINT "alerts_worst_estimate_id_mode_estimates_id_fk" FOREIGN KEY ("worst_estimate_id") REFERENCES "public"."mode_estimates"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alerts" ADD CONSTRAINT "alerts_acknowledged_by_people_id_fk" FOREIGN KEY ("acknowledged_by") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_created_by_people_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_log" ADD CONSTRAINT "audit_log_person_id_people_id_fk" FOREIGN KEY ("person_id") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "channels" ADD CONSTRAINT "channels_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "channels" ADD CONSTRAINT "channels_pmu_id_pmus_id_fk" FOREIGN KEY ("pmu_id") REFERENCES "public"."pmus"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "corridors" ADD CONSTRAINT "corridors_from_site_id_sites_id_fk" FOREIGN KEY ("from_site_id") REFERENCES "public"."sites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "corridors" ADD CONSTRAINT "corridors_to_site_id_sites_id_fk" FOREIGN KEY ("to_site_id") REFERENCES "public"."sites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "corridors" ADD CONSTRAINT "corridors_flow_channel_id_channels_id_fk" FOREIGN KEY ("flow_channel_id") REFERENCES "public"."channels"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "corridors" ADD CONSTRAINT "corridors_from_angle_channel_id_channels_id_fk" FOREIGN KEY ("from_angle_channel_id") REFERENCES "public"."channels"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "corridors" ADD CONSTRAINT "corridors_to_angle_channel_id_channels_id_fk" FOREIGN KEY ("to_angle_channel_id") REFERENCES "public"."channels"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fits" ADD CONSTRAINT "fits_analysis_id_analyses_id_fk" FOREIGN KEY ("analysis_id") REFERENCES "public"."analyses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_invited_by_people_id_fk" FOREIGN KEY ("invited_by") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_person_id_people_id_fk" FOREIGN KEY ("person_id") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mode_estimates" ADD CONSTRAINT "mode_estimates_window_id_scan_windows_id_fk" FOREIGN KEY ("window_id") REFERENCES "public"."scan_windows"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mode_estimates" ADD CONSTRAINT "mode_estimates_fit_id_fits_id_fk" FOREIGN KEY ("fit_id") REFERENCES "public"."fits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mode_estimates" ADD CONSTRAINT "mode_estimates_track_id_mode_tracks_id_fk" FOREIGN KEY ("track_id") REFERENCES "public"."mode_tracks"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mode_shapes" ADD CONSTRAINT "mode_shapes_estimate_id_mode_estimates_id_fk" FOREIGN KEY ("estimate_id") REFERENCES "public"."mode_estimates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mode_shapes" ADD CONSTRAINT "mode_shapes_channel_id_channels_id_fk" FOREIGN KEY ("channel_id") REFERENCES "public"."channels"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "mode_tracks" ADD CONSTRAINT "mode_tracks_corridor_id_corridors_id_fk" FOREIGN KEY ("corridor_id") REFERENCES "public"."corridors"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "password_resets" ADD CONSTRAINT "password_resets_person_id_people_id_fk" FOREIGN KEY ("person_id") REFERENCES "public"."people"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pmus" ADD CONSTRAINT "pmus_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recording_channels" ADD CONSTRAINT "recording_channels_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recording_channels" ADD CONSTRAINT "recording_channels_channel_id_channels_id_fk" FOREIGN KEY ("channel_id") REFERENCES "public"."channels"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recordings" ADD CONSTRAINT "recordings_uploaded_by_people_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample_chunks" ADD CONSTRAINT "sample_chunks_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample_chunks" ADD CONSTRAINT "sample_chunks_channel_id_channels_id_fk" FOREIGN KEY ("channel_id") REFERENCES "public"."channels"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "scan_windows" ADD CONSTRAINT "scan_windows_analysis_id_analyses_id_fk" FOREIGN KEY ("analysis_id") REFERENCES "public"."analyses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sites" ADD CONSTRAINT "sites_area_id_areas_id_fk" FOREIGN KEY ("area_id") REFERENCES "public"."areas"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "track_subscriptions" ADD CONSTRAINT "track_subscriptions_person_id_people_id_fk" FOREIGN KEY ("person_id") REFERENCES "public"."people"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "track_subscriptions" ADD CONSTRAINT "track_subscriptions_track_id_mode_tracks_id_fk" FOREIGN KEY ("track_id") REFERENCES "public"."mode_tracks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "transfer_studies" ADD CONSTRAINT "transfer_studies_track_id_mode_tracks_id_fk" FOREIGN KEY ("track_id") REFERENCES "public"."mode_tracks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "transfer_studies" ADD CONSTRAINT "transfer_studies_corridor_id_corridors_id_fk" FOREIGN KEY ("corridor_id") REFERENCES "public"."corridors"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "transfer_studies" ADD CONSTRAINT "transfer_studies_created_by_people_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."people"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "alert_notifications_alert_idx" ON "alert_notifications" USING btree ("alert_id");--> statement-breakpoint
CREATE INDEX "alerts_track_opened_idx" ON "alerts" USING btree ("track_id","opened_at");--> statement-breakpoint
CREATE INDEX "alerts_opened_idx" ON "alerts" USING btree ("opened_at");--> statement-breakpoint
CREATE INDEX "alerts_state_idx" ON "alerts" USING btree ("state");--> statement-breakpoint
CREATE INDEX "analyses_recording_idx" ON "analyses" USING btree ("recording_id");--> statement-breakpoint
CREATE INDEX "analyses_created_at_idx" ON "analyses" USING btree ("created_at");--> statement-breakpoint
CREATE INDEX "audit_log_at_idx" ON "audit_log" USING btree ("at");--> statement-breakpoint
CREATE INDEX "audit_log_person_idx" ON "audit_log" USING btree ("person_id","at");--> statement-breakpoint
CREATE INDEX "channels_site_idx" ON "channels" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "channels_pmu_idx" ON "channels" USING btree ("pmu_id");--> statement-breakpoint
CREATE INDEX "fits_analysis_idx" ON "fits" USING btree ("analysis_id");--> statement-breakpoint
CREATE INDEX "fits_from_idx" ON "fits" USING btree ("from_time");--> statement-breakpoint
CREATE INDEX "invitations_email_idx" ON "invitations" USING btree ("email");--> statement-breakpoint
CREATE INDEX "mode_estimates_track_at_idx" ON "mode_estimates" USING btree ("track_id","at");--> statement-breakpoint
CREATE INDEX "mode_estimates_at_idx" ON "mode_estimates" USING btree ("at");--> statement-breakpoint
CREATE INDEX "mode_estimates_window_idx" ON "mode_estimates" USING btree ("window_id");--> statement-breakpoint
CREATE INDEX "mode_estimates_fit_idx" ON "mode_estimates" USING btree ("fit_id");--> statement-breakpoint
CREATE INDEX "outbox_messages_received_idx" ON "outbox_messages" USING btree ("received_at");--> statement-breakpoint
CREATE INDEX "password_resets_person_idx" ON "password_resets" USING btree ("person_id");--> statement-breakpoint
CREATE INDEX "pmus_site_idx" ON "pmus" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "recording_channels_channel_idx" ON "recording_channels" USING btree ("channel_id");--> statement-breakpoint
CREATE INDEX "recordings_start_idx" ON "recordings" USING btree ("start_time");--> statement-breakpoint
CREATE INDEX "recordings_uploaded_at_idx" ON "recordings" USING btree ("uploaded_at");--> statement-breakpoint
CREATE INDEX "sample_chunks_time_idx" ON "sample_chunks" USING btree ("recording_id","channel_id","start_time");--> statement-breakpoint
CREATE INDEX "scan_windows_start_idx" ON "scan_windows" USING btree ("start_time");--> statement-breakpoint
CREATE INDEX "IDX_session_expire" ON "session" USING btree ("expire");--> statement-breakpoint
CREATE INDEX "sites_area_idx" ON "sites" USING btree ("area_id");--> statement-breakpoint
CREATE INDEX "track_subscriptions_track_idx" ON "track_subscriptions" USING btree ("track_id");--> statement-breakpoint
CREATE INDEX "transfer_studies_created_idx" ON "transfer_studies" USING btree ("created_at");--> statement-breakpoint
CREATE INDEX "transfer_studies_track_idx" ON "transfer_studies" USING btree ("track_id");