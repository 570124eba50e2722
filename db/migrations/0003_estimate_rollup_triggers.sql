-- Keeps estimate_rollups (db/schema.ts) in step with mode_estimates, inside the writing transaction.
--
-- Statement-level triggers with transition tables collect the (track, 10-minute bucket) pairs a
-- statement touched and estimate_rollups_refresh() recomputes them: 10-minute buckets from the
-- estimates, then their hours from the 10-minute rows, then their days from the hours. A bucket is
-- deleted and rebuilt (never adjusted), so deletes and updates are exact and empty buckets vanish.
--
-- Concurrency (READ COMMITTED, the application's level): writers of the same track and day take one
-- transaction-scoped advisory lock per (track, day) — every bucket of every span lies within one
-- day — in key order, then recompute. Each statement of a VOLATILE plpgsql function takes a fresh
-- snapshot, so a writer that waited for the lock sees the estimates and rollup rows of the writer
-- that held it. estimate_rollups_rebuild() takes a SHARE ROW EXCLUSIVE lock on the table instead.
-- Lock keys: 'KEEL' in the high 32 bits, then track id × 2^20 + day number (single-bigint key
-- space; the application's two-key advisory locks never collide with it).
CREATE OR REPLACE FUNCTION estimate_rollups_roll_up(p_tracks integer[], p_starts timestamptz[], p_span integer, p_from_span integer)
RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  v_tracks integer[];
  v_starts timestamptz[];
BEGIN
  -- the distinct (track, bucket) pairs at p_span covering the given sub-bucket starts
  SELECT array_agg(b.track_id), array_agg(b.start) INTO v_tracks, v_starts
    FROM (SELECT DISTINCT k.track_id, to_timestamp(floor(extract(epoch FROM k.start) / p_span) * p_span) AS start
            FROM unnest(p_tracks, p_starts) AS k(track_id, start)) b;
  IF v_tracks IS NULL THEN
    RETURN;
  END IF;
  DELETE FROM estimate_rollups r USING unnest(v_tracks, v_starts) AS b(track_id, start)
   WHERE r.track_id = b.track_id AND r.span_seconds = p_span AND r.start = b.start;
  INSERT INTO estimate_rollups (track_id, span_seconds, start, count, natural_count, frequency_sum, natural_frequency_sum,
                                damping_min, damping_max, damping_sum, damping_lo_sum, damping_lo_count, damping_hi_sum, damping_hi_count)
  SELECT b.track_id, p_span, b.start, sum(r.count), sum(r.natural_count), sum(r.frequency_sum), sum(r.natural_frequency_sum),
         min(r.damping_min), max(r.damping_max), sum(r.damping_sum), sum(r.damping_lo_sum), sum(r.damping_lo_count),
         sum(r.damping_hi_sum), sum(r.damping_hi_count)
    FROM unnest(v_tracks, v_starts) AS b(track_id, start)
    JOIN estimate_rollups r ON r.track_id = b.track_id AND r.span_seconds = p_from_span
                           AND r.start >= b.start AND r.start < b.start + make_interval(secs => p_span)
   GROUP BY b.track_id, b.start;
END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimate_rollups_refresh(p_tracks integer[], p_ats timestamptz[])
RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  v_key bigint;
  v_tracks integer[];
  v_starts timestamptz[];
BEGIN
  FOR v_key IN
    SELECT DISTINCT x'4b45454c00000000'::bigint + k.track_id::bigint * 1048576 + floor(extract(epoch FROM k.at) / 86400)::bigint
      FROM unnest(p_tracks, p_ats) AS k(track_id, at)
     WHERE k.track_id IS NOT NULL
     ORDER BY 1
  LOOP
    PERFORM pg_advisory_xact_lock(v_key);
  END LOOP;

  SELECT array_agg(b.track_id), array_agg(b.start) INTO v_tracks, v_starts
    FROM (SELECT DISTINCT k.track_id, to_timestamp(floor(extract(epoch FROM k.at) / 600) * 600) AS start
            FROM unnest(p_tracks, p_ats) AS k(track_id, at)
           WHERE k.track_id IS NOT NULL) b;
  IF v_tracks IS NULL THEN
    RETURN;
  END IF;

  DELETE FROM estimate_rollups r USING unnest(v_tracks, v_starts) AS b(track_id, start)
   WHERE r.track_id = b.track_id AND r.span_seconds = 600 AND r.start = b.start;
  INSERT INTO estimate_rollups (track_id, span_seconds, start, count, natural_count, frequency_sum, natural_frequency_sum,
                                damping_min, damping_max, damping_sum, damping_lo_sum, damping_lo_count, damping_hi_sum, damping_hi_count)
  SELECT b.track_id, 600, b.start, count(*), count(*) FILTER (WHERE NOT e.forced),
         sum(e.frequency_hz), coalesce(sum(e.frequency_hz) FILTER (WHERE NOT e.forced), 0),
         min(e.damping_percent) FILTER (WHERE NOT e.forced), max(e.damping_percent) FILTER (WHERE NOT e.forced),
         coalesce(sum(e.damping_percent) FILTER (WHERE NOT e.forced), 0),
         coalesce(sum(e.damping_lo) FILTER (WHERE NOT e.forced), 0), count(e.damping_lo) FILTER (WHERE NOT e.forced),
         coalesce(sum(e.damping_hi) FILTER (WHERE NOT e.forced), 0), count(e.damping_hi) FILTER (WHERE NOT e.forced)
    FROM unnest(v_tracks, v_starts) AS b(track_id, start)
    JOIN mode_estimates e ON e.track_id = b.track_id AND e.at >= b.start AND e.at < b.start + interval '600 seconds'
   GROUP BY b.track_id, b.start;

  PERFORM estimate_rollups_roll_up(v_tracks, v_starts, 3600, 600);
  PERFORM estimate_rollups_roll_up(v_tracks, v_starts, 86400, 3600);
END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimate_rollups_rebuild(p_from timestamptz, p_to timestamptz)
RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  v_from timestamptz;
  v_to timestamptz;
BEGIN
  IF p_from IS NULL OR p_to IS NULL OR p_from > p_to THEN
    RETURN;
  END IF;
  -- whole days, so every bucket of every span in the range is rebuilt from complete inputs
  v_from := to_timestamp(floor(extract(epoch FROM p_from) / 86400) * 86400);
  v_to := to_timestamp((floor(extract(epoch FROM p_to) / 86400) + 1) * 86400);
  LOCK TABLE estimate_rollups IN SHARE ROW EXCLUSIVE MODE;
  DELETE FROM estimate_rollups WHERE start >= v_from AND start < v_to;
  INSERT INTO estimate_rollups (track_id, span_seconds, start, count, natural_count, frequency_sum, natural_frequency_sum,
                                damping_min, damping_max, damping_sum, damping_lo_sum, damping_lo_count, damping_hi_sum, damping_hi_count)
  SELECT e.track_id, 600, to_timestamp(floor(extract(epoch FROM e.at) / 600) * 600), count(*), count(*) FILTER (WHERE NOT e.forced),
         sum(e.frequency_hz), coalesce(sum(e.frequency_hz) FILTER (WHERE NOT e.forced), 0),
         min(e.damping_percent) FILTER (WHERE NOT e.forced), max(e.damping_percent) FILTER (WHERE NOT e.forced),
         coalesce(sum(e.damping_percent) FILTER (WHERE NOT e.forced), 0),
         coalesce(sum(e.damping_lo) FILTER (WHERE NOT e.forced), 0), count(e.damping_lo) FILTER (WHERE NOT e.forced),
         coalesce(sum(e.damping_hi) FILTER (WHERE NOT e.forced), 0), count(e.damping_hi) FILTER (WHERE NOT e.forced)
    FROM mode_estimates e
   WHERE e.track_id IS NOT NULL AND e.at >= v_from AND e.at < v_to
   GROUP BY 1, 3;
  INSERT INTO estimate_rollups (track_id, span_seconds, start, count, natural_count, frequency_sum, natural_frequency_sum,
                                damping_min, damping_max, damping_sum, damping_lo_sum, damping_lo_count, damping_hi_sum, damping_hi_count)
  SELECT r.track_id, 3600, to_timestamp(floor(extract(epoch FROM r.start) / 3600) * 3600), sum(r.count), sum(r.natural_count),
         sum(r.frequency_sum), sum(r.natural_frequency_sum), min(r.damping_min), max(r.damping_max), sum(r.damping_sum),
         sum(r.damping_lo_sum), sum(r.damping_lo_count), sum(r.damping_hi_sum), sum(r.damping_hi_count)
    FROM estimate_rollups r
   WHERE r.span_seconds = 600 AND r.start >= v_from AND r.start < v_to
   GROUP BY r.track_id, 3;
  INSERT INTO estimate_rollups (track_id, span_seconds, start, count, natural_count, frequency_sum, natural_frequency_sum,
                                damping_min, damping_max, damping_sum, damping_lo_sum, damping_lo_count, damping_hi_sum, damping_hi_count)
  SELECT r.track_id, 86400, to_timestamp(floor(extract(epoch FROM r.start) / 86400) * 86400), sum(r.count), sum(r.natural_count),
         sum(r.frequency_sum), sum(r.natural_frequency_sum), min(r.damping_min), max(r.damping_max), sum(r.damping_sum),
         sum(r.damping_lo_sum), sum(r.damping_lo_count), sum(r.damping_hi_sum), sum(r.damping_hi_count)
    FROM estimate_rollups r
   WHERE r.span_seconds = 3600 AND r.start >= v_from AND r.start < v_to
   GROUP BY r.track_id, 3;
END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimate_rollups_after_insert() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM estimate_rollups_refresh(array_agg(n.track_id), array_agg(n.at)) FROM new_rows n WHERE n.track_id IS NOT NULL;
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimate_rollups_after_update() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM estimate_rollups_refresh(array_agg(x.track_id), array_agg(x.at))
     FROM (SELECT track_id, at FROM old_rows UNION ALL SELECT track_id, at FROM new_rows) x
    WHERE x.track_id IS NOT NULL;
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimate_rollups_after_delete() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM estimate_rollups_refresh(array_agg(o.track_id), array_agg(o.at)) FROM old_rows o WHERE o.track_id IS NOT NULL;
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION estimate_rollups_after_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  DELETE FROM estimate_rollups;
  RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER estimate_rollups_insert AFTER INSERT ON mode_estimates
  REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION estimate_rollups_after_insert();
--> statement-breakpoint
CREATE TRIGGER estimate_rollups_update AFTER UPDATE ON mode_estimates
  REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION estimate_rollups_after_update();
--> statement-breakpoint
CREATE TRIGGER estimate_rollups_delete AFTER DELETE ON mode_estimates
  REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION estimate_rollups_after_delete();
--> statement-breakpoint
CREATE TRIGGER estimate_rollups_truncate AFTER TRUNCATE ON mode_estimates
  FOR EACH STATEMENT EXECUTE FUNCTION estimate_rollups_after_truncate();
--> statement-breakpoint
-- the estimates already stored
SELECT estimate_rollups_rebuild(min(at), max(at)) FROM mode_estimates WHERE track_id IS NOT NULL;
