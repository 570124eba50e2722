// The whole data model (DESIGN.md §5.1). Time is timestamptz in UTC everywhere. Migrations come
// only from `npx drizzle-kit generate --name <what_it_does>` (drizzle.config.ts).
//
// Units stored: frequency in Hz, damping ratio in percent (dampingPercent = 100·ζ), angles in
// degrees, power in MW, voltage in kV. Row shapes here are the storage shapes; the API contract
// lives in shared/api (written by hand, never derived from this file).
import { sql } from 'drizzle-orm';
import {
  bigint,
  boolean,
  check,
  customType,
  doublePrecision,
  index,
  integer,
  json,
  jsonb,
  pgTable,
  primaryKey,
  text,
  timestamp,
  unique,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/pg-core';

const tstz = (name: string) => timestamp(name, { withTimezone: true, mode: 'date' });
const createdAt = () => tstz('created_at').notNull().defaultNow();

/** Raw bytes (sample chunks: little-endian Float32 or Float64 arrays). */
export const bytea = customType<{ data: Buffer; driverData: Buffer }>({
  dataType() {
    return 'bytea';
  },
});

const inList = (column: string, values: readonly string[]) =>
  sql.raw(`${column} in (${values.map((v) => `'${v}'`).join(', ')})`);

export const ROLE_VALUES = ['admin', 'engineer', 'operator', 'planner'] as const;

// ---------------------------------------------------------------- people and access

export const people = pgTable(
  'people',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    /** Stored lower-case and trimmed (the API normalises before it gets here). */
    email: text('email').notNull().unique('people_email_unique'),
    displayName: text('display_name').notNull(),
    role: text('role', { enum: ROLE_VALUES }).notNull(),
    /** scrypt$N$r$p$salt$hash (server/auth/passwords.ts). */
    passwordHash: text('password_hash').notNull(),
    disabled: boolean('disabled').notNull().default(false),
    createdAt: createdAt(),
    updatedAt: tstz('updated_at').notNull().defaultNow(),
  },
  (t) => [check('people_role_check', inList('role', ROLE_VALUES))],
);

/**
 * connect-pg-simple's table (its documented layout; `expire` as timestamptz so the store's
 * to_timestamp() comparisons are zone-free). Created here so that drizzle-kit owns every table.
 */
export const sessions = pgTable(
  'session',
  {
    sid: varchar('sid').primaryKey(),
    sess: json('sess').notNull(),
    expire: timestamp('expire', { withTimezone: true, precision: 6, mode: 'date' }).notNull(),
  },
  (t) => [index('IDX_session_expire').on(t.expire)],
);

export const invitations = pgTable(
  'invitations',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    /** SHA-256 (hex) of the e-mailed token; the token itself is never stored. */
    tokenHash: text('token_hash').notNull().unique('invitations_token_hash_unique'),
    email: text('email').notNull(),
    role: text('role', { enum: ROLE_VALUES }).notNull(),
    invitedBy: integer('invited_by').references(() => people.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    expiresAt: tstz('expires_at').notNull(),
    usedAt: tstz('used_at'),
    revokedAt: tstz('revoked_at'),
    /** The account created by accepting this invitation. */
    personId: integer('person_id').references(() => people.id, { onDelete: 'set null' }),
  },
  (t) => [check('invitations_role_check', inList('role', ROLE_VALUES)), index('invitations_email_idx').on(t.email)],
);

export const passwordResets = pgTable(
  'password_resets',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    tokenHash: text('token_hash').notNull().unique('password_resets_token_hash_unique'),
    personId: integer('person_id')
      .notNull()
      .references(() => people.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
    expiresAt: tstz('expires_at').notNull(),
    usedAt: tstz('used_at'),
  },
  (t) => [index('password_resets_person_idx').on(t.personId)],
);

export const auditLog = pgTable(
  'audit_log',
  {
    id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    /** Who acted; null for anonymous actions (a failed sign-in, a reset request). */
    personId: integer('person_id').references(() => people.id, { onDelete: 'set null' }),
    action: text('action').notNull(),
    /** What was acted on, as "<kind>:<id or code>", e.g. "person:4", "site:moorgate". */
    target: text('target'),
    details: jsonb('details').$type<Record<string, unknown>>().notNull().default({}),
    ip: text('ip'),
    at: tstz('at').notNull().defaultNow(),
  },
  (t) => [index('audit_log_at_idx').on(t.at), index('audit_log_person_idx').on(t.personId, t.at)],
);

// ---------------------------------------------------------------- the network

export const areas = pgTable('areas', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  code: text('code').notNull().unique('areas_code_unique'),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
});

export const sites = pgTable(
  'sites',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    code: text('code').notNull().unique('sites_code_unique'),
    name: text('name').notNull(),
    areaId: integer('area_id')
      .notNull()
      .references(() => areas.id, { onDelete: 'restrict' }),
    kV: doublePrecision('kv').notNull(),
    /** Schematic placement 0..100 (x east, y north); not geographic. */
    x: doublePrecision('x').notNull(),
    y: doublePrecision('y').notNull(),
  },
  (t) => [index('sites_area_idx').on(t.areaId)],
);

export const pmus = pgTable(
  'pmus',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    code: text('code').notNull().unique('pmus_code_unique'),
    name: text('name').notNull(),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id, { onDelete: 'restrict' }),
    /** Frames per second (IEEE C37.118.1 reporting rate). */
    reportingRate: doublePrecision('reporting_rate').notNull(),
    description: text('description').notNull().default(''),
  },
  (t) => [index('pmus_site_idx').on(t.siteId)],
);

export const CHANNEL_KIND_VALUES = ['angle', 'frequency', 'flow', 'voltage'] as const;
export const CHANNEL_UNIT_VALUES = ['deg', 'Hz', 'MW', 'kV', 'pu'] as const;

export const channels = pgTable(
  'channels',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    /** Column name in uploaded files, e.g. "moorgate.angle". */
    name: text('name').notNull().unique('channels_name_unique'),
    siteId: integer('site_id')
      .notNull()
      .references(() => sites.id, { onDelete: 'restrict' }),
    pmuId: integer('pmu_id').references(() => pmus.id, { onDelete: 'restrict' }),
    kind: text('kind', { enum: CHANNEL_KIND_VALUES }).notNull(),
    unit: text('unit', { enum: CHANNEL_UNIT_VALUES }).notNull(),
    description: text('description').notNull().default(''),
  },
  (t) => [
    check('channels_kind_check', inList('kind', CHANNEL_KIND_VALUES)),
    check('channels_unit_check', inList('unit', CHANNEL_UNIT_VALUES)),
    index('channels_site_idx').on(t.siteId),
    index('channels_pmu_idx').on(t.pmuId),
  ],
);

export const corridors = pgTable(
  'corridors',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    code: text('code').notNull().unique('corridors_code_unique'),
    name: text('name').notNull(),
    fromSiteId: integer('from_site_id')
      .notNull()
      .references(() => sites.id, { onDelete: 'restrict' }),
    toSiteId: integer('to_site_id')
      .notNull()
      .references(() => sites.id, { onDelete: 'restrict' }),
    kV: doublePrecision('kv').notNull(),
    /** MW flow, positive from fromSite to toSite. */
    flowChannelId: integer('flow_channel_id').references(() => channels.id, { onDelete: 'restrict' }),
    fromAngleChannelId: integer('from_angle_channel_id').references(() => channels.id, { onDelete: 'restrict' }),
    toAngleChannelId: integer('to_angle_channel_id').references(() => channels.id, { onDelete: 'restrict' }),
  },
  (t) => [check('corridors_distinct_ends', sql`${t.fromSiteId} <> ${t.toSiteId}`)],
);

export interface TrackReferenceShape {
  groupA: string[];
  groupB: string[];
}

export const modeTracks = pgTable(
  'mode_tracks',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    code: text('code').notNull().unique('mode_tracks_code_unique'),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    minHz: doublePrecision('min_hz').notNull(),
    maxHz: doublePrecision('max_hz').notNull(),
    /** Damping thresholds in percent. */
    poorBelow: doublePrecision('poor_below').notNull().default(3),
    lowBelow: doublePrecision('low_below').notNull().default(5),
    corridorId: integer('corridor_id').references(() => corridors.id, { onDelete: 'restrict' }),
    /** Expected mode shape: site codes swinging together (groupA) against groupB. */
    reference: jsonb('reference').$type<TrackReferenceShape>().notNull().default({ groupA: [], groupB: [] }),
    createdAt: createdAt(),
  },
  (t) => [
    check('mode_tracks_band', sql`${t.minHz} < ${t.maxHz}`),
    check('mode_tracks_thresholds', sql`${t.poorBelow} < ${t.lowBelow}`),
  ],
);

/** Who gets alert e-mails for which track. */
export const trackSubscriptions = pgTable(
  'track_subscriptions',
  {
    personId: integer('person_id')
      .notNull()
      .references(() => people.id, { onDelete: 'cascade' }),
    trackId: integer('track_id')
      .notNull()
      .references(() => modeTracks.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.personId, t.trackId] }), index('track_subscriptions_track_idx').on(t.trackId)],
);

// ---------------------------------------------------------------- recordings and samples

export const RECORDING_FORMAT_VALUES = ['csv', 'comtrade-ascii', 'comtrade-binary'] as const;
export const RECORDING_STATUS_VALUES = ['uploaded', 'ingesting', 'ready', 'failed'] as const;

export const recordings = pgTable(
  'recordings',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    fileName: text('file_name').notNull(),
    /** SHA-256 hex of the uploaded bytes: the same file is never stored twice. */
    checksum: text('checksum').notNull().unique('recordings_checksum_unique'),
    format: text('format', { enum: RECORDING_FORMAT_VALUES }).notNull(),
    sizeBytes: bigint('size_bytes', { mode: 'number' }),
    startTime: tstz('start_time'),
    endTime: tstz('end_time'),
    /** Samples per second. */
    rate: doublePrecision('rate'),
    channelCount: integer('channel_count'),
    sampleCount: integer('sample_count'),
    status: text('status', { enum: RECORDING_STATUS_VALUES }).notNull().default('uploaded'),
    uploadedBy: integer('uploaded_by').references(() => people.id, { onDelete: 'set null' }),
    uploadedAt: tstz('uploaded_at').notNull().defaultNow(),
    error: text('error'),
    /** Gaps, duplicates, NaN/dropout counts and the like for the whole file. */
    quality: jsonb('quality').$type<Record<string, unknown>>(),
  },
  (t) => [
    check('recordings_format_check', inList('format', RECORDING_FORMAT_VALUES)),
    check('recordings_status_check', inList('status', RECORDING_STATUS_VALUES)),
    index('recordings_start_idx').on(t.startTime),
    index('recordings_uploaded_at_idx').on(t.uploadedAt),
  ],
);

export const recordingChannels = pgTable(
  'recording_channels',
  {
    recordingId: integer('recording_id')
      .notNull()
      .references(() => recordings.id, { onDelete: 'cascade' }),
    channelId: integer('channel_id')
      .notNull()
      .references(() => channels.id, { onDelete: 'restrict' }),
    /** Column name or COMTRADE channel id as it appeared in the file. */
    sourceName: text('source_name').notNull(),
    columnIndex: integer('column_index').notNull(),
    quality: jsonb('quality').$type<Record<string, unknown>>(),
  },
  (t) => [primaryKey({ columns: [t.recordingId, t.channelId] }), index('recording_channels_channel_idx').on(t.channelId)],
);

export const SAMPLE_DTYPE_VALUES = ['f32', 'f64'] as const;

/** A run of consecutive samples of one channel, stored as a little-endian float array. */
export const sampleChunks = pgTable(
  'sample_chunks',
  {
    recordingId: integer('recording_id')
      .notNull()
      .references(() => recordings.id, { onDelete: 'cascade' }),
    channelId: integer('channel_id')
      .notNull()
      .references(() => channels.id, { onDelete: 'restrict' }),
    chunkIndex: integer('chunk_index').notNull(),
    startTime: tstz('start_time').notNull(),
    count: integer('count').notNull(),
    dtype: text('dtype', { enum: SAMPLE_DTYPE_VALUES }).notNull(),
    /** `count` little-endian Float32 (dtype f32) or Float64 (f64) values; NaN marks a dropout. */
    values: bytea('values').notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.recordingId, t.channelId, t.chunkIndex] }),
    check('sample_chunks_dtype_check', inList('dtype', SAMPLE_DTYPE_VALUES)),
    check('sample_chunks_count_check', sql`${t.count} > 0`),
    index('sample_chunks_time_idx').on(t.recordingId, t.channelId, t.startTime),
  ],
);

// ---------------------------------------------------------------- analyses and results

export const ANALYSIS_KIND_VALUES = ['scan', 'fit', 'ingest'] as const;
export const ANALYSIS_STATUS_VALUES = ['queued', 'running', 'done', 'failed'] as const;

export const analyses = pgTable(
  'analyses',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    kind: text('kind', { enum: ANALYSIS_KIND_VALUES }).notNull(),
    recordingId: integer('recording_id')
      .notNull()
      .references(() => recordings.id, { onDelete: 'cascade' }),
    method: text('method'),
    settings: jsonb('settings').$type<Record<string, unknown>>().notNull().default({}),
    status: text('status', { enum: ANALYSIS_STATUS_VALUES }).notNull().default('queued'),
    /** 0..1 */
    progress: doublePrecision('progress').notNull().default(0),
    error: text('error'),
    jobId: text('job_id'),
    createdBy: integer('created_by').references(() => people.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    startedAt: tstz('started_at'),
    finishedAt: tstz('finished_at'),
    /** Per-stage durations in milliseconds (preprocess, estimate, store, …). */
    timings: jsonb('timings').$type<Record<string, number>>(),
  },
  (t) => [
    check('analyses_kind_check', inList('kind', ANALYSIS_KIND_VALUES)),
    check('analyses_status_check', inList('status', ANALYSIS_STATUS_VALUES)),
    check('analyses_progress_check', sql`${t.progress} >= 0 and ${t.progress} <= 1`),
    index('analyses_recording_idx').on(t.recordingId),
    index('analyses_created_at_idx').on(t.createdAt),
  ],
);

/** One sliding window of an ambient scan. */
export const scanWindows = pgTable(
  'scan_windows',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    analysisId: integer('analysis_id')
      .notNull()
      .references(() => analyses.id, { onDelete: 'cascade' }),
    startTime: tstz('start_time').notNull(),
    endTime: tstz('end_time').notNull(),
    quality: jsonb('quality').$type<Record<string, unknown>>(),
    /** Mean corridor transfer over the window, MW, keyed by corridor code. */
    transferMw: jsonb('transfer_mw').$type<Record<string, number>>(),
    /** Mean corridor angle (from-end minus to-end bus angle) over the window, degrees, keyed by corridor code. */
    angleDeg: jsonb('angle_deg').$type<Record<string, number>>(),
  },
  (t) => [
    unique('scan_windows_analysis_start_unique').on(t.analysisId, t.startTime),
    index('scan_windows_start_idx').on(t.startTime),
  ],
);

/** One ring-down fit over an interval of a recording. */
export const fits = pgTable(
  'fits',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    analysisId: integer('analysis_id')
      .notNull()
      .references(() => analyses.id, { onDelete: 'cascade' }),
    fromTime: tstz('from_time').notNull(),
    toTime: tstz('to_time').notNull(),
    method: text('method').notNull(),
    modelOrder: integer('model_order'),
    snrDb: doublePrecision('snr_db'),
    /** Reconstructed signal per channel (decimated for display). */
    reconstruction: jsonb('reconstruction').$type<Record<string, unknown>>(),
    createdAt: createdAt(),
  },
  (t) => [index('fits_analysis_idx').on(t.analysisId), index('fits_from_idx').on(t.fromTime)],
);

export const modeEstimates = pgTable(
  'mode_estimates',
  {
    id: bigint('id', { mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
    windowId: integer('window_id').references(() => scanWindows.id, { onDelete: 'cascade' }),
    fitId: integer('fit_id').references(() => fits.id, { onDelete: 'cascade' }),
    trackId: integer('track_id').references(() => modeTracks.id, { onDelete: 'set null' }),
    /** Time the estimate stands for (window end for ambient scans, interval start for fits). */
    at: tstz('at').notNull(),
    frequencyHz: doublePrecision('frequency_hz').notNull(),
    dampingPercent: doublePrecision('damping_percent').notNull(),
    dampingLo: doublePrecision('damping_lo'),
    dampingHi: doublePrecision('damping_hi'),
    frequencyLo: doublePrecision('frequency_lo'),
    frequencyHi: doublePrecision('frequency_hi'),
    amplitude: doublePrecision('amplitude'),
    /** Estimator-specific goodness of fit (e.g. energy share or spectral coherence), 0..1. */
    fitQuality: doublePrecision('fit_quality'),
    method: text('method').notNull(),
    forced: boolean('forced').notNull().default(false),
  },
  (t) => [
    check('mode_estimates_source', sql`(${t.windowId} is null) <> (${t.fitId} is null)`),
    // (track, time) ranges for Trends, and the newest estimate of a track (at desc, id desc) by one
    // backward probe — with id in the key, no sort of equal times and no pass over other tracks
    index('mode_estimates_track_at_id_idx').on(t.trackId, t.at, t.id),
    index('mode_estimates_at_idx').on(t.at),
    index('mode_estimates_window_idx').on(t.windowId),
    index('mode_estimates_fit_idx').on(t.fitId),
  ],
);

export const modeShapes = pgTable(
  'mode_shapes',
  {
    estimateId: bigint('estimate_id', { mode: 'number' })
      .notNull()
      .references(() => modeEstimates.id, { onDelete: 'cascade' }),
    channelId: integer('channel_id')
      .notNull()
      .references(() => channels.id, { onDelete: 'restrict' }),
    magnitude: doublePrecision('magnitude').notNull(),
    angleDeg: doublePrecision('angle_deg').notNull(),
  },
  (t) => [primaryKey({ columns: [t.estimateId, t.channelId] })],
);

/** Rollup bucket widths, seconds: 10 minutes, an hour, a day (each a multiple of the one before). */
export const ROLLUP_SPANS = [600, 3600, 86_400] as const;

/**
 * Pre-aggregated estimates of each track per epoch-aligned time bucket ([start, start + span) by
 * `at`), at the three ROLLUP_SPANS, so a long Trends span or the Watch sparkline reads a few
 * hundred rows instead of every estimate. Sums and counts (not means) so buckets combine exactly.
 *
 * Derived data, kept by the database itself: statement-level triggers on mode_estimates recompute
 * the touched buckets (10-minute ones from the estimates, hours from 10-minute rows, days from
 * hours) under a per-(track, day) advisory lock; estimate_rollups_rebuild(from, to) recomputes a
 * range (bulk loads, repairs). Migration 0003_estimate_rollup_triggers holds the SQL.
 */
export const estimateRollups = pgTable(
  'estimate_rollups',
  {
    trackId: integer('track_id')
      .notNull()
      .references(() => modeTracks.id, { onDelete: 'cascade' }),
    spanSeconds: integer('span_seconds').notNull(),
    start: tstz('start').notNull(),
    /** Every estimate of the track in the bucket (natural and forced). */
    count: integer('count').notNull(),
    naturalCount: integer('natural_count').notNull(),
    frequencySum: doublePrecision('frequency_sum').notNull(),
    naturalFrequencySum: doublePrecision('natural_frequency_sum').notNull(),
    /** Damping statistics over natural-mode estimates (null min/max when there is none). */
    dampingMin: doublePrecision('damping_min'),
    dampingMax: doublePrecision('damping_max'),
    dampingSum: doublePrecision('damping_sum').notNull(),
    /** Sums and counts of the natural estimates' CI bounds (an estimate may have none). */
    dampingLoSum: doublePrecision('damping_lo_sum').notNull(),
    dampingLoCount: integer('damping_lo_count').notNull(),
    dampingHiSum: doublePrecision('damping_hi_sum').notNull(),
    dampingHiCount: integer('damping_hi_count').notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.trackId, t.spanSeconds, t.start] }),
    check('estimate_rollups_span_check', sql`${t.spanSeconds} in (600, 3600, 86400)`),
    check('estimate_rollups_count_check', sql`${t.count} > 0 and ${t.naturalCount} >= 0 and ${t.naturalCount} <= ${t.count}`),
  ],
);

// ---------------------------------------------------------------- alerts

export const ALERT_KIND_VALUES = ['poor', 'forced'] as const;
export const ALERT_STATE_VALUES = ['open', 'acknowledged', 'cleared'] as const;

export const alerts = pgTable(
  'alerts',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    trackId: integer('track_id')
      .notNull()
      .references(() => modeTracks.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: ALERT_KIND_VALUES }).notNull(),
    state: text('state', { enum: ALERT_STATE_VALUES }).notNull().default('open'),
    /** Escalation step: 1 when opened, +1 at each escalation. */
    level: integer('level').notNull().default(1),
    openedAt: tstz('opened_at').notNull(),
    escalatedAt: tstz('escalated_at'),
    clearedAt: tstz('cleared_at'),
    /** Lowest damping seen while the alert was open, percent. */
    worstDamping: doublePrecision('worst_damping'),
    worstEstimateId: bigint('worst_estimate_id', { mode: 'number' }).references(() => modeEstimates.id, {
      onDelete: 'set null',
    }),
    acknowledgedBy: integer('acknowledged_by').references(() => people.id, { onDelete: 'set null' }),
    acknowledgedAt: tstz('acknowledged_at'),
    note: text('note'),
  },
  (t) => [
    check('alerts_kind_check', inList('kind', ALERT_KIND_VALUES)),
    check('alerts_state_check', inList('state', ALERT_STATE_VALUES)),
    index('alerts_track_opened_idx').on(t.trackId, t.openedAt),
    // The alert rule is replayed over the estimates (server/alerts/rule.ts): an alert is identified
    // by its track, kind and the window end at which it opened.
    unique('alerts_track_kind_opened_unique').on(t.trackId, t.kind, t.openedAt),
    index('alerts_opened_idx').on(t.openedAt),
    index('alerts_state_idx').on(t.state),
  ],
);

export const ALERT_EVENT_VALUES = ['opened', 'escalated', 'cleared'] as const;

export const alertNotifications = pgTable(
  'alert_notifications',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    alertId: integer('alert_id')
      .notNull()
      .references(() => alerts.id, { onDelete: 'cascade' }),
    personId: integer('person_id')
      .notNull()
      .references(() => people.id, { onDelete: 'cascade' }),
    event: text('event', { enum: ALERT_EVENT_VALUES }).notNull(),
    sentAt: tstz('sent_at'),
    createdAt: createdAt(),
  },
  (t) => [
    check('alert_notifications_event_check', inList('event', ALERT_EVENT_VALUES)),
    index('alert_notifications_alert_idx').on(t.alertId),
    unique('alert_notifications_once').on(t.alertId, t.personId, t.event),
  ],
);

// ---------------------------------------------------------------- e-mail outbox and studies

/** Every message the local fake SMTP server received (server/mail-sink.ts). */
export const outboxMessages = pgTable(
  'outbox_messages',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    messageId: text('message_id'),
    from: text('from').notNull().default(''),
    to: text('to').notNull().default(''),
    subject: text('subject').notNull().default(''),
    text: text('text'),
    html: text('html'),
    receivedAt: tstz('received_at').notNull().defaultNow(),
  },
  (t) => [index('outbox_messages_received_idx').on(t.receivedAt)],
);

export const transferStudies = pgTable(
  'transfer_studies',
  {
    id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
    name: text('name').notNull().default(''),
    trackId: integer('track_id')
      .notNull()
      .references(() => modeTracks.id, { onDelete: 'cascade' }),
    corridorId: integer('corridor_id').references(() => corridors.id, { onDelete: 'set null' }),
    periodFrom: tstz('period_from').notNull(),
    periodTo: tstz('period_to').notNull(),
    result: jsonb('result').$type<Record<string, unknown>>().notNull(),
    createdBy: integer('created_by').references(() => people.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
  },
  (t) => [index('transfer_studies_created_idx').on(t.createdAt), index('transfer_studies_track_idx').on(t.trackId)],
);
