// Alerts (Alerts screen, Watch).
//
// The rule (server/alerts/rule.ts, per mode track, thresholds from the track):
//   kind 'poor'   — opens when the UPPER bound of the damping CI stays under poorBelow for 3
//                   consecutive scan windows; escalates (level 2) when it stays poor for 10 more
//                   windows or one window's upper bound falls under half of poorBelow; clears after
//                   3 consecutive windows with damping at or above lowBelow (hysteresis).
//   kind 'forced' — a forced oscillation in the track's band for 3 consecutive windows; clears after
//                   3 windows without one. Forced estimates never count as poor damping.
// States: 'open' → 'acknowledged' (an operator's note) → 'cleared' (by the rule). An escalation
// puts an acknowledged alert back to 'open' (it needs a new look); the earlier note is kept.
// E-mails go to the people subscribed to the track on open, escalate and clear.
//
// GET  /api/alerts?state&track&limit          (view)              → { alerts }
// GET  /api/alerts/:id                        (view)              → the alert, its damping trace,
//      the mode shape at its worst window, who was notified, and its history (audit log)
// POST /api/alerts/:id/acknowledge { note }   (acknowledgeAlert: admin, engineer, operator) → { alert }
//
// Caution shown with every alert: estimates are advisory; operating actions follow the operator's
// own procedures, the reliability coordinator's instructions and local rules.
import { z } from 'zod';
import { idSchema, isoDateTime } from './common';
import { shapeEntrySchema } from './estimates';

export const ALERT_KINDS = ['poor', 'forced'] as const;
export const ALERT_STATES = ['open', 'acknowledged', 'cleared'] as const;
export const alertKindSchema = z.enum(ALERT_KINDS);
export const alertStateSchema = z.enum(ALERT_STATES);

export const ADVISORY_CAUTION =
  "Estimates are advisory. Operating actions follow the operator's own procedures, the reliability coordinator's instructions and local rules.";

export const alertSummarySchema = z.object({
  id: z.number().int(),
  trackCode: z.string(),
  trackName: z.string(),
  kind: alertKindSchema,
  state: alertStateSchema,
  /** 1 when opened, 2 once escalated. */
  level: z.number().int(),
  /** When the rule's evidence was complete (the end of the window that opened it). */
  openedAt: isoDateTime,
  escalatedAt: isoDateTime.nullable(),
  clearedAt: isoDateTime.nullable(),
  /** Seconds from openedAt to clearedAt, or to now while it lasts. */
  durationSeconds: z.number(),
  /** Lowest damping estimate while open, percent (null for forced alerts). */
  worstDamping: z.number().nullable(),
  worstEstimateId: z.number().int().nullable(),
  poorBelow: z.number(),
  lowBelow: z.number(),
  acknowledgedBy: z.object({ id: z.number().int(), displayName: z.string() }).nullable(),
  acknowledgedAt: isoDateTime.nullable(),
  note: z.string().nullable(),
});
export type AlertSummary = z.infer<typeof alertSummarySchema>;

export const alertsQuerySchema = z
  .object({
    state: alertStateSchema.optional(),
    /** Track code. */
    track: z.string().max(64).optional(),
    limit: z.coerce
      .number({ error: 'limit must be a number' })
      .int({ error: 'limit must be a whole number' })
      .min(1, { error: 'limit must be at least 1' })
      .max(500, { error: 'limit must be at most 500' })
      .default(100),
  })
  .strict();
export type AlertsQuery = z.input<typeof alertsQuerySchema>;

export const alertsResponseSchema = z.object({ alerts: z.array(alertSummarySchema), caution: z.string() });
export type AlertsResponse = z.infer<typeof alertsResponseSchema>;

export const alertTracePointSchema = z.object({
  estimateId: z.number().int(),
  at: isoDateTime,
  frequencyHz: z.number(),
  dampingPercent: z.number(),
  dampingLo: z.number().nullable(),
  dampingHi: z.number().nullable(),
  forced: z.boolean(),
});

export const alertDetailResponseSchema = z.object({
  alert: alertSummarySchema,
  caution: z.string(),
  /** The track's estimates from an hour before opening to an hour after clearing (or now). */
  trace: z.array(alertTracePointSchema),
  traceFrom: isoDateTime,
  traceTo: isoDateTime,
  /** The mode shape at the worst window (damping alerts), largest magnitude first. */
  worstShape: z.array(shapeEntrySchema),
  worstAt: isoDateTime.nullable(),
  notifications: z.array(
    z.object({
      personId: z.number().int(),
      displayName: z.string(),
      email: z.string(),
      event: z.enum(['opened', 'escalated', 'cleared']),
      /** When the e-mail was handed to the mail queue (null: not yet). */
      sentAt: isoDateTime.nullable(),
    }),
  ),
  /** Audit entries of this alert, oldest first. */
  history: z.array(
    z.object({
      at: isoDateTime,
      action: z.string(),
      personId: z.number().int().nullable(),
      displayName: z.string().nullable(),
      details: z.record(z.string(), z.unknown()),
    }),
  ),
});
export type AlertDetailResponse = z.infer<typeof alertDetailResponseSchema>;

export const alertIdParamsSchema = z.object({ id: idSchema });

export const acknowledgeBodySchema = z
  .object({
    note: z
      .string({ error: 'A note is required' })
      .trim()
      .min(1, { error: 'A note is required: say what you saw or did' })
      .max(2000, { error: 'The note must be at most 2000 characters' }),
  })
  .strict();
export type AcknowledgeBody = z.infer<typeof acknowledgeBodySchema>;

export const alertResponseSchema = z.object({ alert: alertSummarySchema });
export type AlertResponse = z.infer<typeof alertResponseSchema>;
