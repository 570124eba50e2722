// Ambient scans (Scans screen) and the analyses list.
//
// POST /api/recordings/:id/scans { settings? }        (runAnalysis: admin, engineer)  → 201 { analysis }
//   Queues an ambient scan of a ready recording. Settings not given take the estimator's defaults
//   (20-min windows stepped by 1 min, Yule-Walker, 0.1–2 Hz; modal/ambient-options.ts). The
//   estimator's own options check runs before anything is queued: a bad setting is a 400 whose
//   message names it. Progress: the analysis row (status, progress 0..1, error) and the SSE stream.
// GET /api/analyses?recording&kind&status&limit        (view)  → { analyses }
// GET /api/scans/:id                                    (view)  → the scan's windows with their modes
//   (:id is the analysis id). Mode shapes are per estimate: GET /api/estimates/:id.
import { z } from 'zod';
import { idSchema, isoDateTime } from './common';
import { analysisKindSchema, analysisStatusSchema } from './events';
import { modeEstimateSchema } from './estimates';

export { ANALYSIS_KINDS, ANALYSIS_STATUSES, analysisKindSchema, analysisStatusSchema } from './events';

const posNumber = (what: string, unit: string) =>
  z.number({ error: `${what} must be a number of ${unit}` }).positive({ error: `${what} must be positive` });

/** Settings of an ambient scan: the estimator's options (hand-written mirror of AmbientOptions). */
export const scanSettingsSchema = z
  .object({
    /** Analysis window, s (default 1200). */
    windowSeconds: posNumber('windowSeconds', 'seconds').max(7200, { error: 'windowSeconds must be at most 7200 (2 hours)' }).optional(),
    /** Window step, s (default 60). */
    stepSeconds: posNumber('stepSeconds', 'seconds').max(7200, { error: 'stepSeconds must be at most 7200 (2 hours)' }).optional(),
    /** Band of reported modes, Hz (default [0.1, 2.0]). */
    bandHz: z.tuple([z.number(), z.number()], { error: 'bandHz must be [low, high] in Hz' }).optional(),
    analysisRate: posNumber('analysisRate', 'samples/s').nullable().optional(),
    method: z.enum(['yule-walker', 'acf-matrix-pencil'], { error: "method must be 'yule-walker' or 'acf-matrix-pencil'" }).optional(),
    arOrder: z.number({ error: 'arOrder must be a number' }).int({ error: 'arOrder must be a whole number' }).optional(),
    acfLagSeconds: posNumber('acfLagSeconds', 'seconds').optional(),
    confidenceLevel: z.number({ error: 'confidenceLevel must be a number' }).optional(),
    jackknifeGroups: z.number({ error: 'jackknifeGroups must be a number' }).int({ error: 'jackknifeGroups must be a whole number' }).optional(),
    maxDampingPercent: z.number({ error: 'maxDampingPercent must be a number' }).optional(),
    forced: z
      .object({
        enabled: z.boolean({ error: 'forced.enabled must be true or false' }).optional(),
        maxDampingPercent: z.number({ error: 'forced.maxDampingPercent must be a number' }).optional(),
        minCoherence: z.number({ error: 'forced.minCoherence must be a number' }).optional(),
      })
      .strict()
      .optional(),
    /** Channels to analyse (default: all of the recording except the angle reference). */
    channels: z.array(z.string().min(1).max(200)).min(1, { error: 'channels must name at least one channel' }).max(500).nullable().optional(),
    angleReference: z.string().min(1).max(200).nullable().optional(),
    angleChannels: z.array(z.string().min(1).max(200)).max(500).nullable().optional(),
    maxGapSeconds: z.number({ error: 'maxGapSeconds must be a number' }).optional(),
    maxMissingPercent: z.number({ error: 'maxMissingPercent must be a number' }).optional(),
    segmentSeconds: posNumber('segmentSeconds', 'seconds').optional(),
    shapeReference: z.string().min(1).max(200).nullable().optional(),
  })
  .strict();
export type ScanSettings = z.infer<typeof scanSettingsSchema>;

export const scanCreateBodySchema = z.object({ settings: scanSettingsSchema.default({}) }).strict();
export type ScanCreateBody = z.input<typeof scanCreateBodySchema>;

/** An analysis (scan, fit or ingest) as lists and progress bars need it. */
export const analysisSummarySchema = z.object({
  id: z.number().int(),
  kind: analysisKindSchema,
  recordingId: z.number().int(),
  recordingName: z.string().nullable(),
  method: z.string().nullable(),
  settings: z.record(z.string(), z.unknown()),
  status: analysisStatusSchema,
  /** 0..1 */
  progress: z.number(),
  /** Readable failure reason when status is 'failed'. */
  error: z.string().nullable(),
  createdAt: isoDateTime,
  startedAt: isoDateTime.nullable(),
  finishedAt: isoDateTime.nullable(),
  createdBy: z.number().int().nullable(),
  /** Scans: windows stored so far. */
  windows: z.number().int().nullable(),
});
export type AnalysisSummary = z.infer<typeof analysisSummarySchema>;

export const analysisResponseSchema = z.object({ analysis: analysisSummarySchema });
export type AnalysisResponse = z.infer<typeof analysisResponseSchema>;

export const analysesQuerySchema = z
  .object({
    recording: idSchema.optional(),
    kind: analysisKindSchema.optional(),
    status: analysisStatusSchema.optional(),
    limit: z.coerce
      .number({ error: 'limit must be a number' })
      .int({ error: 'limit must be a whole number' })
      .min(1, { error: 'limit must be at least 1' })
      .max(500, { error: 'limit must be at most 500' })
      .default(100),
  })
  .strict();
export type AnalysesQuery = z.input<typeof analysesQuerySchema>;

export const analysesResponseSchema = z.object({ analyses: z.array(analysisSummarySchema) });
export type AnalysesResponse = z.infer<typeof analysesResponseSchema>;

export const scanWindowSchema = z.object({
  id: z.number().int(),
  start: isoDateTime,
  end: isoDateTime,
  /** Not estimated (too many missing samples); `reason` says why. */
  skipped: z.boolean(),
  reason: z.string().nullable(),
  /** Mean corridor MW over the window, by corridor code. */
  transferMw: z.record(z.string(), z.number()),
  /** Mean corridor angle (from-end − to-end), degrees, by corridor code. */
  angleDeg: z.record(z.string(), z.number()),
  /** Modes found in the window, by frequency. */
  modes: z.array(modeEstimateSchema),
});
export type ScanWindow = z.infer<typeof scanWindowSchema>;

export const scanResultsResponseSchema = z.object({
  analysis: analysisSummarySchema,
  windows: z.array(scanWindowSchema),
});
export type ScanResultsResponse = z.infer<typeof scanResultsResponseSchema>;
