// Ring-down fits (Fits screen and the ring-down view).
//
// POST /api/recordings/:id/fits { from, to, channels?, order?, bandHz? }   (runAnalysis: admin, engineer)
//   → 201 { analysis }. Queues one fit of the interval [from, to] with BOTH Prony and the matrix
//   pencil (the two are compared side by side). `order` applies to both ('auto' by default);
//   channels default to every channel of the recording. The interval must lie inside the recording
//   and last 2–600 s.
// GET /api/fits/:id        (view) → the analysis and, once done, each method's modes and its
//   reconstruction (:id is the analysis id). Series are on a uniform grid: sample i is at
//   startTime + i·stepSeconds; long intervals are thinned to at most ~1500 points per series by
//   keeping every k-th sample (the view is a chart, the CSV export has every mode).
// GET /api/fits/:id.csv    (view) → text/csv: one row per method, mode and channel.
import { z } from 'zod';
import { idSchema, isoDateTime } from './common';
import { bandSchema } from './estimates';
import { analysisSummarySchema } from './scans';

export const FIT_METHODS = ['prony', 'matrix-pencil'] as const;

const time = (what: string) =>
  z.iso.datetime({ offset: true, error: `${what} must be an ISO-8601 date-time with a zone, e.g. 2025-01-01T00:10:05.5Z` });

export const fitCreateBodySchema = z
  .object({
    from: time('from'),
    to: time('to'),
    channels: z
      .array(z.string().min(1).max(200), { error: 'channels must be a list of channel names' })
      .min(1, { error: 'channels must name at least one channel' })
      .max(100, { error: 'channels may name at most 100 channels' })
      .optional(),
    order: z
      .union([
        z.literal('auto'),
        z.number().int({ error: 'order must be a whole number' }).min(1, { error: 'order must be at least 1' }).max(200, { error: 'order must be at most 200' }),
      ], { error: 'order must be "auto" or a whole number' })
      .default('auto'),
    bandHz: z.tuple([z.number(), z.number()], { error: 'bandHz must be [low, high] in Hz' }).optional(),
  })
  .strict()
  .superRefine((b, ctx) => {
    const span = (Date.parse(b.to) - Date.parse(b.from)) / 1000;
    if (!(span > 0)) ctx.addIssue({ code: 'custom', path: ['to'], message: 'to must be after from' });
    else if (span < 2) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The interval must last at least 2 s' });
    else if (span > 600) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The interval must last at most 600 s' });
  });
export type FitCreateBody = z.input<typeof fitCreateBodySchema>;

export const fitModeSchema = z.object({
  /** Stored estimate id (GET /api/estimates/:id gives its shape). */
  id: z.number().int(),
  trackCode: z.string().nullable(),
  frequencyHz: z.number(),
  dampingPercent: z.number(),
  band: bandSchema,
  /** Share of the reconstructed signal energy, 0..1. */
  energyShare: z.number(),
  /** Per channel: peak amplitude at the interval start (channel unit) and phase, degrees. */
  channels: z.array(z.object({ channel: z.string(), amplitude: z.number(), phaseDeg: z.number() })),
});
export type FitMode = z.infer<typeof fitModeSchema>;

export const reconstructionSeriesSchema = z.object({
  channel: z.string(),
  /** Detrended input, the sum of the modes, input − sum, and each mode's part (same order as `modes`). */
  input: z.array(z.number()),
  total: z.array(z.number()),
  residual: z.array(z.number()),
  perMode: z.array(z.array(z.number())),
});

export const fitMethodResultSchema = z.object({
  fitId: z.number().int(),
  method: z.enum(FIT_METHODS),
  /** Model order used (exponentials, conjugates counted). */
  order: z.number().int().nullable(),
  snrDb: z.number().nullable(),
  /** Samples/s the poles were estimated at (after decimation). */
  analysisRate: z.number().nullable(),
  modes: z.array(fitModeSchema),
  reconstruction: z.object({
    startTime: isoDateTime,
    stepSeconds: z.number(),
    /** Samples kept per series, and how many the full grid had. */
    points: z.number().int(),
    fullPoints: z.number().int(),
    series: z.array(reconstructionSeriesSchema),
  }),
});
export type FitMethodResult = z.infer<typeof fitMethodResultSchema>;

export const fitDetailResponseSchema = z.object({
  analysis: analysisSummarySchema,
  from: isoDateTime,
  to: isoDateTime,
  channels: z.array(z.string()),
  /** Empty until the fit is done; one entry per method otherwise (Prony first). */
  methods: z.array(fitMethodResultSchema),
});
export type FitDetailResponse = z.infer<typeof fitDetailResponseSchema>;

export const fitIdParamsSchema = z.object({ id: idSchema });

export const FIT_CSV_COLUMNS = [
  'method',
  'mode',
  'frequency_hz',
  'damping_percent',
  'energy_share',
  'track',
  'channel',
  'amplitude',
  'phase_deg',
  'model_order',
  'snr_db',
  'from_utc',
  'to_utc',
] as const;
