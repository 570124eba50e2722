// GET /api/health (public): 200 when PostgreSQL and Redis answer, 503 otherwise (same body).
import { z } from 'zod';
import { isoDateTime } from './common';

export const healthResponseSchema = z.object({
  status: z.enum(['ok', 'degraded']),
  database: z.enum(['ok', 'down']),
  redis: z.enum(['ok', 'down']),
  /** 'ok' when at least one worker wrote its heartbeat within the last ~15 s. */
  worker: z.enum(['ok', 'absent']),
  workers: z.number().int(),
  uptimeSeconds: z.number(),
  checkedAt: isoDateTime,
});
export type HealthResponse = z.infer<typeof healthResponseSchema>;
