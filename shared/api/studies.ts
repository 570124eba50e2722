// Transfer study: a track's damping against its corridor's transfer over a period.
//
// GET  /api/studies/transfer?track&from&to   (runStudy: admin, engineer, planner) → { study }
// GET  /api/studies/transfer.csv?track&from&to (runStudy) → text/csv: EVERY window of the period,
//      streamed from the database (STUDY_CSV_COLUMNS), whatever the answer above shows
// POST /api/studies { name, track, from, to } (runStudy)  → 201 { saved }: runs it again on the
//      server and stores the result (what was computed is what is saved: the same answer as the
//      GET, display sample included, so a saved 90-day study stays small)
// GET  /api/studies                           (view) → { studies } (saved, newest first, no points)
// GET  /api/studies/:id                       (view) → { saved } with the whole result (a study
//      saved before answers were sampled holds every window: it is sampled, and counted, on reading)
//
// The windows of a study: the track's estimates in the period whose scan window carries the
// corridor's transfer, one per window start (where scans overlap, the newest analysis wins).
// Every statistic below (pointsUsed, pointsForced, nEffective, both fits, projections) is computed
// over ALL of them. `points` is only what the scatter draws:
//
// Display sample (`points`): at most STUDY_MAX_POINTS windows. When the period has that many or
// fewer, `points` is every window, in time order, exactly as stored. Otherwise the windows are
// chosen deterministically (the same data always give the same sample), stratified so the scatter
// looks like the whole cloud:
//   1. the transfer range [min, max] MW is cut into STUDY_SAMPLE_BINS equal bins;
//   2. always kept: in each bin, the natural (not forced) window with the LOWEST damping and the
//      one with the highest (ties: the earlier window; a bin of forced windows only: among those)
//      — so the lowest-damped window at every transfer level, what a planner looks for, is never
//      dropped — and the windows at the lowest and the highest transfer of the period;
//   3. the rest of the budget is shared among the bins in proportion to their remaining windows
//      (largest remainders, ties to the lower bin); within a bin the windows are ranked by damping
//      and taken at evenly spaced ranks, so each bin's spread of damping is kept;
//   4. the chosen windows are sent in time order.
// `pointsTotal` counts every window, `pointsShown` = points.length, `pointsSampled` says whether
// points is a sample (pointsShown < pointsTotal).
//
// Method ('ols-fieller'): ordinary least squares of damping (%) on corridor MW over the track's
// natural-mode window estimates; confidence band of the mean line; the MW at which the line
// reaches the track's lowBelow and poorBelow (5 % and 3 % by default) by inverse prediction, with
// the delta-method standard error and a Fieller interval at 95 % (textbook: Draper & Smith,
// "Applied Regression Analysis", §3.2). Overlapping windows are not independent: the variances
// are inflated by n / nEffective, with nEffective ≈ the number of non-overlapping windows.
// The same line is fitted to the corridor angle (from-end − to-end, degrees) against MW, with the
// MW at the 45° practical limit (common practice).
//
// Caution shown with every study: a study is reviewed by a qualified engineer before it changes a
// limit; estimates are advisory.
import { z } from 'zod';
import { idSchema, isoDateTime } from './common';

export const STUDY_CAUTION =
  'Advisory. A transfer study is reviewed by a qualified engineer before it changes any operating limit.';

/** Most windows an answer's `points` holds (the display sample; see above). */
export const STUDY_MAX_POINTS = 2000;
/** Transfer bins of the display sample. */
export const STUDY_SAMPLE_BINS = 40;

/** Columns of GET /api/studies/transfer.csv: one row per window of the study, oldest first. */
export const STUDY_CSV_COLUMNS = [
  'window_start_utc',
  'window_end_utc',
  'transfer_mw',
  'damping_percent',
  'damping_lo_percent',
  'damping_hi_percent',
  'corridor_angle_deg',
  'forced',
  'analysis_id',
] as const;

const time = (what: string) => z.iso.datetime({ offset: true, error: `${what} must be an ISO-8601 date-time with a zone` });

export const transferStudyQuerySchema = z
  .object({
    track: z.string({ error: 'track (a track code) is required' }).min(1, { error: 'track (a track code) is required' }).max(64),
    from: time('from'),
    to: time('to'),
  })
  .strict()
  .refine((q) => Date.parse(q.from) < Date.parse(q.to), { error: 'from must be before to', path: ['to'] });
export type TransferStudyQuery = z.infer<typeof transferStudyQuerySchema>;

export const studyPointSchema = z.object({
  analysisId: z.number().int(),
  /** Window start and end. */
  start: isoDateTime,
  end: isoDateTime,
  transferMw: z.number(),
  dampingPercent: z.number(),
  dampingLo: z.number().nullable(),
  dampingHi: z.number().nullable(),
  angleDeg: z.number().nullable(),
  forced: z.boolean(),
});

const fitSummarySchema = z.object({
  n: z.number().int(),
  nEffective: z.number(),
  intercept: z.number(),
  slope: z.number(),
  interceptSe: z.number(),
  slopeSe: z.number(),
  residualSd: z.number(),
  r2: z.number(),
  confidenceLevel: z.number(),
});

const bandPointSchema = z.object({ x: z.number(), y: z.number(), lo: z.number(), hi: z.number() });

const projectionSchema = z.object({
  /** The damping (or angle) the line reaches. */
  y: z.number(),
  /** Projected MW (null when the line is flat). */
  x: z.number().nullable(),
  /** Delta-method standard error of x, MW. */
  se: z.number().nullable(),
  /** Fieller interval, MW (null when unbounded: the slope is not significant). */
  lo: z.number().nullable(),
  hi: z.number().nullable(),
  /** The projection lies outside the transfer range of the data. */
  extrapolated: z.boolean(),
  note: z.string().nullable(),
});

export const transferStudySchema = z.object({
  track: z.object({ code: z.string(), name: z.string(), poorBelow: z.number(), lowBelow: z.number() }),
  corridor: z.object({ code: z.string(), name: z.string() }),
  from: isoDateTime,
  to: isoDateTime,
  method: z.literal('ols-fieller'),
  confidenceLevel: z.number(),
  /** The display sample: every window when pointsTotal ≤ STUDY_MAX_POINTS (see above). */
  points: z.array(studyPointSchema).max(STUDY_MAX_POINTS),
  /** Windows of the period (every one of them is in the CSV export). */
  pointsTotal: z.number().int().nonnegative(),
  /** points.length. */
  pointsShown: z.number().int().nonnegative(),
  /** points is a sample of the windows (pointsShown < pointsTotal). */
  pointsSampled: z.boolean(),
  /** Natural-mode windows in the fits (of pointsTotal). */
  pointsUsed: z.number().int(),
  /** Forced-oscillation windows left out of the fits (of pointsTotal). */
  pointsForced: z.number().int(),
  nEffective: z.number(),
  damping: z.object({
    fit: fitSummarySchema.nullable(),
    /** x: MW; y, lo, hi: damping %. */
    line: z.array(bandPointSchema),
    /** [lowBelow crossing, poorBelow crossing]. */
    projections: z.array(projectionSchema.extend({ threshold: z.enum(['low', 'poor']) })),
    note: z.string().nullable(),
  }),
  angle: z.object({
    fit: fitSummarySchema.nullable(),
    /** x: MW; y, lo, hi: degrees. */
    line: z.array(bandPointSchema),
    limitDeg: z.number(),
    atLimit: projectionSchema.nullable(),
    note: z.string().nullable(),
  }),
  caution: z.string(),
}).superRefine((s, ctx) => {
  // the counts describe `points`; a mismatch would mislabel the sample on screen
  if (s.pointsShown !== s.points.length) ctx.addIssue({ code: 'custom', path: ['pointsShown'], message: `pointsShown (${s.pointsShown}) must equal the number of points (${s.points.length})` });
  if (s.pointsShown > s.pointsTotal) ctx.addIssue({ code: 'custom', path: ['pointsShown'], message: `pointsShown (${s.pointsShown}) must not exceed pointsTotal (${s.pointsTotal})` });
  if (s.pointsSampled !== s.pointsShown < s.pointsTotal) ctx.addIssue({ code: 'custom', path: ['pointsSampled'], message: 'pointsSampled must be true exactly when pointsShown < pointsTotal' });
});
export type TransferStudy = z.infer<typeof transferStudySchema>;

export const transferStudyResponseSchema = z.object({ study: transferStudySchema });
export type TransferStudyResponse = z.infer<typeof transferStudyResponseSchema>;

export const studySaveBodySchema = z
  .object({
    name: z.string({ error: 'A name is required' }).trim().min(1, { error: 'A name is required' }).max(200, { error: 'The name must be at most 200 characters' }),
    track: z.string({ error: 'track (a track code) is required' }).min(1).max(64),
    from: time('from'),
    to: time('to'),
  })
  .strict()
  .refine((q) => Date.parse(q.from) < Date.parse(q.to), { error: 'from must be before to', path: ['to'] });
export type StudySaveBody = z.infer<typeof studySaveBodySchema>;

export const savedStudySummarySchema = z.object({
  id: z.number().int(),
  name: z.string(),
  trackCode: z.string(),
  corridorCode: z.string().nullable(),
  from: isoDateTime,
  to: isoDateTime,
  createdAt: isoDateTime,
  createdBy: z.object({ id: z.number().int(), displayName: z.string() }).nullable(),
  /** Projected MW at the poor threshold (null when there is none). */
  poorAtMw: z.number().nullable(),
  lowAtMw: z.number().nullable(),
});
export type SavedStudySummary = z.infer<typeof savedStudySummarySchema>;

export const savedStudiesResponseSchema = z.object({ studies: z.array(savedStudySummarySchema) });
export const savedStudyResponseSchema = z.object({ saved: savedStudySummarySchema.extend({ result: transferStudySchema }) });
export type SavedStudyResponse = z.infer<typeof savedStudyResponseSchema>;

export const studyIdParamsSchema = z.object({ id: idSchema });
