// Watch: every mode track at a glance.
//
// GET /api/watch   (view) → { generatedAt, tracks: [...] }, tracks in network order, each with
//   - latest: the newest estimate (band against the track's thresholds, CI, age in seconds);
//   - stale: true when no estimate arrived for longer than the scan step allows
//     (staleAfterSeconds = 3 × the step of the scan that produced the latest estimate, at least
//     5 minutes), or when the track has no estimate at all;
//   - sparkline: damping over the 24 hours up to the latest estimate, in 10-minute buckets
//     (min / mean / max of the natural-mode estimates; forced ones are left out);
//   - openAlerts: the track's alerts that are not cleared (open or acknowledged).
import { z } from 'zod';
import { isoDateTime } from './common';
import { alertSummarySchema } from './alerts';
import { bandSchema } from './estimates';

export const SPARKLINE_HOURS = 24;
export const SPARKLINE_BUCKET_MINUTES = 10;

export const watchTrackSchema = z.object({
  code: z.string(),
  name: z.string(),
  description: z.string(),
  minHz: z.number(),
  maxHz: z.number(),
  poorBelow: z.number(),
  lowBelow: z.number(),
  corridor: z.object({ code: z.string(), name: z.string() }).nullable(),
  latest: z
    .object({
      estimateId: z.number().int(),
      at: isoDateTime,
      ageSeconds: z.number(),
      frequencyHz: z.number(),
      dampingPercent: z.number(),
      dampingLo: z.number().nullable(),
      dampingHi: z.number().nullable(),
      forced: z.boolean(),
      band: bandSchema,
      method: z.string(),
    })
    .nullable(),
  stale: z.boolean(),
  staleAfterSeconds: z.number(),
  sparkline: z.array(
    z.object({
      /** Bucket start. */
      t: isoDateTime,
      min: z.number(),
      mean: z.number(),
      max: z.number(),
    }),
  ),
  openAlerts: z.array(alertSummarySchema),
});
export type WatchTrack = z.infer<typeof watchTrackSchema>;

export const watchResponseSchema = z.object({
  generatedAt: isoDateTime,
  tracks: z.array(watchTrackSchema),
  caution: z.string(),
});
export type WatchResponse = z.infer<typeof watchResponseSchema>;
