// The Outbox (administrators): every message the local fake SMTP server received.
import { z } from 'zod';
import { isoDateTime } from './common';

export const outboxListQuerySchema = z
  .object({
    limit: z.coerce
      .number({ error: 'limit must be a number' })
      .int({ error: 'limit must be a whole number' })
      .min(1, { error: 'limit must be at least 1' })
      .max(500, { error: 'limit must be at most 500' })
      .default(100),
    /** Only messages whose To contains this text (case-insensitive). */
    to: z.string().trim().max(254, { error: 'to is too long' }).optional(),
  })
  .strict();
export type OutboxListQuery = z.infer<typeof outboxListQuerySchema>;

export const outboxSummarySchema = z.object({
  id: z.number().int(),
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  receivedAt: isoDateTime,
});
export type OutboxSummary = z.infer<typeof outboxSummarySchema>;

export const outboxMessageSchema = outboxSummarySchema.extend({
  text: z.string().nullable(),
  html: z.string().nullable(),
  messageId: z.string().nullable(),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

export const outboxListResponseSchema = z.object({ messages: z.array(outboxSummarySchema) });
export type OutboxListResponse = z.infer<typeof outboxListResponseSchema>;

export const outboxMessageResponseSchema = z.object({ message: outboxMessageSchema });
export type OutboxMessageResponse = z.infer<typeof outboxMessageResponseSchema>;
