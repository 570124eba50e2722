// Live updates: GET /api/events (any signed-in person) is a Server-Sent Events stream
// (text/event-stream). Each message's `event:` field is the event's `type` and its `data:` field
// the JSON below, so a client does
//   const es = new EventSource('/api/events');
//   es.addEventListener('analysis.progress', (m) => keelEventSchema.parse(JSON.parse(m.data)));
// The stream starts with an `event: ready` message ({ "type": "ready" }) and sends a comment line
// every ~20 s to keep proxies from closing it. Events are not replayed after a reconnect: refetch
// the resource (TanStack Query invalidation) when `ready` arrives again.
//
// Every server instance relays the same events: workers and servers publish them on Redis
// pub/sub, and each server fans them out to its own SSE clients.
import { z } from 'zod';
import { isoDateTime } from './common';

export const ANALYSIS_KINDS = ['scan', 'fit', 'ingest'] as const;
export const ANALYSIS_STATUSES = ['queued', 'running', 'done', 'failed'] as const;
export const analysisKindSchema = z.enum(ANALYSIS_KINDS);
export const analysisStatusSchema = z.enum(ANALYSIS_STATUSES);

/** A scan or fit moved: status and progress (0..1) as stored on the analysis row. */
export const analysisProgressEventSchema = z.object({
  type: z.literal('analysis.progress'),
  analysisId: z.number().int(),
  recordingId: z.number().int(),
  kind: analysisKindSchema,
  status: analysisStatusSchema,
  progress: z.number().min(0).max(1),
  /** Readable failure reason when status is 'failed'. */
  error: z.string().nullable(),
  at: isoDateTime,
});
export type AnalysisProgressEvent = z.infer<typeof analysisProgressEventSchema>;

export const ALERT_EVENT_TYPES = ['alert.opened', 'alert.escalated', 'alert.cleared', 'alert.acknowledged'] as const;

/** An alert changed; fetch GET /api/alerts/:id for the whole of it. */
export const alertEventSchema = z.object({
  type: z.enum(ALERT_EVENT_TYPES),
  alertId: z.number().int(),
  trackCode: z.string(),
  trackName: z.string(),
  /** 'poor': poorly damped mode; 'forced': a forced oscillation in the track's band. */
  kind: z.enum(['poor', 'forced']),
  level: z.number().int(),
  worstDamping: z.number().nullable(),
  at: isoDateTime,
});
export type AlertEvent = z.infer<typeof alertEventSchema>;

export const keelEventSchema = z.union([analysisProgressEventSchema, alertEventSchema]);
export type KeelEvent = z.infer<typeof keelEventSchema>;
export type KeelEventType = KeelEvent['type'];

/** Sent first on every connection (and so again after every reconnect). */
export const readyEventSchema = z.object({ type: z.literal('ready') });
