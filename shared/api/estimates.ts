// Mode estimates of a track over time (Trends), one estimate with its mode shape, and the CSV export.
//
// GET /api/tracks/:code/estimates?from&to&maxPoints            (view)
//   Short spans come back as raw points; when the span holds more estimates than maxPoints
//   (default 1000), as time buckets with min/mean/max damping and the mean CI bounds, so a chart
//   can draw a min/max band for long spans (DESIGN.md §4). `aggregated` says which.
// GET /api/tracks/:code/estimates.csv?from&to                   (view)  text/csv, one row per estimate
// GET /api/estimates/:id                                        (view)  one estimate and its mode shape
//
// Times are ISO-8601 UTC. An ambient estimate's `at` is its window END (when it became known).
// Damping in percent, frequency in Hz; the CI bounds are the estimator's interval (90 % by default).
import { z } from 'zod';
import { BANDS } from '../bands';
import { idSchema, isoDateTime } from './common';

export const bandSchema = z.enum(BANDS);

/** One stored mode estimate (a scan window's or a ring-down fit's). */
export const modeEstimateSchema = z.object({
  id: z.number().int(),
  /** Track the estimate was assigned to; null for modes outside every track. */
  trackCode: z.string().nullable(),
  at: isoDateTime,
  frequencyHz: z.number(),
  dampingPercent: z.number(),
  dampingLo: z.number().nullable(),
  dampingHi: z.number().nullable(),
  frequencyLo: z.number().nullable(),
  frequencyHi: z.number().nullable(),
  amplitude: z.number().nullable(),
  /** Estimator-specific quality 0..1 (ambient: relative strength; ring-down: energy share). */
  fitQuality: z.number().nullable(),
  method: z.string(),
  forced: z.boolean(),
  /** Band against the track's thresholds (the 3/5 % defaults when the estimate has no track). */
  band: bandSchema,
});
export type ModeEstimate = z.infer<typeof modeEstimateSchema>;

/** One channel of a mode shape: magnitude relative to the largest (1) and angle, degrees. */
export const shapeEntrySchema = z.object({
  channel: z.string(),
  site: z.string(),
  siteName: z.string(),
  area: z.string(),
  /** Schematic position of the site (0..100), to draw the shape on the network map. */
  x: z.number(),
  y: z.number(),
  magnitude: z.number(),
  angleDeg: z.number(),
});
export type ShapeEntry = z.infer<typeof shapeEntrySchema>;

export const trackCodeParamsSchema = z.object({
  code: z
    .string()
    .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, { error: 'Track code may hold lower-case letters, digits and hyphens' })
    .max(64, { error: 'Track code is too long' }),
});

const optionalTime = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO-8601 date-time with a zone, e.g. 2025-01-01T00:00:00Z` }).optional();

/** from/to default to the 24 hours before the track's newest estimate (or before now). */
export const estimatesQuerySchema = z
  .object({
    from: optionalTime('from'),
    to: optionalTime('to'),
    maxPoints: z.coerce
      .number({ error: 'maxPoints must be a number' })
      .int({ error: 'maxPoints must be a whole number' })
      .min(10, { error: 'maxPoints must be at least 10' })
      .max(20_000, { error: 'maxPoints must be at most 20000' })
      .default(1000),
    /** Leave forced-oscillation estimates out (default false: they are shown, flagged). */
    naturalOnly: z.enum(['true', 'false'], { error: 'naturalOnly must be true or false' }).default('false'),
  })
  .strict()
  .refine((q) => !q.from || !q.to || Date.parse(q.from) < Date.parse(q.to), { error: 'from must be before to', path: ['to'] });
export type EstimatesQuery = z.input<typeof estimatesQuerySchema>;

export const estimatesCsvQuerySchema = z
  .object({ from: optionalTime('from'), to: optionalTime('to') })
  .strict()
  .refine((q) => !q.from || !q.to || Date.parse(q.from) < Date.parse(q.to), { error: 'from must be before to', path: ['to'] });

export const estimatePointSchema = z.object({
  id: z.number().int(),
  at: isoDateTime,
  frequencyHz: z.number(),
  dampingPercent: z.number(),
  dampingLo: z.number().nullable(),
  dampingHi: z.number().nullable(),
  forced: z.boolean(),
  band: bandSchema,
});
export type EstimatePoint = z.infer<typeof estimatePointSchema>;

/** One time bucket of a long span: [start, start + bucketSeconds). */
export const estimateBucketSchema = z.object({
  start: isoDateTime,
  count: z.number().int(),
  /** Damping statistics of the natural-mode estimates (null when the bucket holds only forced ones). */
  dampingMin: z.number().nullable(),
  dampingMean: z.number().nullable(),
  dampingMax: z.number().nullable(),
  /** Mean of the estimates' CI bounds in the bucket (null when none had an interval). */
  dampingLoMean: z.number().nullable(),
  dampingHiMean: z.number().nullable(),
  frequencyMean: z.number(),
  forcedCount: z.number().int(),
  /** Band of the bucket's lowest damping ('forced' when it holds only forced estimates). */
  band: bandSchema,
});
export type EstimateBucket = z.infer<typeof estimateBucketSchema>;

export const trackEstimatesResponseSchema = z.object({
  track: z.object({ code: z.string(), name: z.string(), poorBelow: z.number(), lowBelow: z.number(), minHz: z.number(), maxHz: z.number() }),
  from: isoDateTime,
  to: isoDateTime,
  /** Estimates in [from, to]. */
  total: z.number().int(),
  aggregated: z.boolean(),
  bucketSeconds: z.number().nullable(),
  /** Raw estimates (aggregated = false), oldest first. */
  points: z.array(estimatePointSchema),
  /** Buckets (aggregated = true), oldest first; empty buckets are left out. */
  buckets: z.array(estimateBucketSchema),
});
export type TrackEstimatesResponse = z.infer<typeof trackEstimatesResponseSchema>;

export const estimateDetailResponseSchema = z.object({
  estimate: modeEstimateSchema.extend({
    trackName: z.string().nullable(),
    /** The scan window (ambient) or the fit (ring-down) it came from. */
    source: z.discriminatedUnion('kind', [
      z.object({ kind: z.literal('window'), windowId: z.number().int(), analysisId: z.number().int(), start: isoDateTime, end: isoDateTime }),
      z.object({ kind: z.literal('fit'), fitId: z.number().int(), analysisId: z.number().int(), from: isoDateTime, to: isoDateTime }),
    ]),
  }),
  /** The mode shape, largest magnitude first (empty when none was stored). */
  shape: z.array(shapeEntrySchema),
});
export type EstimateDetailResponse = z.infer<typeof estimateDetailResponseSchema>;

export const estimateIdParamsSchema = z.object({ id: idSchema });

/** Columns of the estimates CSV, in order (units in the header names). */
export const ESTIMATES_CSV_COLUMNS = [
  'time_utc',
  'track',
  'frequency_hz',
  'damping_percent',
  'damping_lo_percent',
  'damping_hi_percent',
  'band',
  'forced',
  'method',
  'estimate_id',
] as const;
