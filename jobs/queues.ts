// Queue names, typed payloads (validated with zod on both sides) and default job options.
// Payloads carry no secrets: an e-mail job holds only the message itself, and it is removed from
// Redis once sent (an invitation link is a bearer credential until it is used or expires).
import { Queue, type ConnectionOptions, type JobsOptions } from 'bullmq';
import { z } from 'zod';

export const QUEUE_NAMES = {
  email: 'email',
} as const;
export type QueueName = (typeof QUEUE_NAMES)[keyof typeof QUEUE_NAMES];

export const EMAIL_KINDS = ['invitation', 'password-reset', 'alert'] as const;

export const emailJobSchema = z
  .object({
    kind: z.enum(EMAIL_KINDS),
    to: z.email({ error: 'to must be an e-mail address' }),
    subject: z.string().min(1, { error: 'subject is required' }).max(300, { error: 'subject is too long' }),
    text: z.string().min(1, { error: 'text is required' }).max(100_000, { error: 'text is too long' }),
    html: z.string().max(200_000, { error: 'html is too long' }).optional(),
  })
  .strict();
export type EmailJob = z.infer<typeof emailJobSchema>;

/** Transient faults (SMTP down) retry 5 times with exponential backoff: 1, 2, 4, 8 s. */
export const DEFAULT_JOB_OPTIONS: JobsOptions = {
  attempts: 5,
  backoff: { type: 'exponential', delay: 1000 },
  removeOnComplete: true,
  removeOnFail: { age: 7 * 24 * 3600, count: 1000 },
};

export function createEmailQueue(connection: ConnectionOptions, prefix: string): Queue<EmailJob> {
  return new Queue<EmailJob>(QUEUE_NAMES.email, { connection, prefix, defaultJobOptions: DEFAULT_JOB_OPTIONS });
}

export async function enqueueEmail(queue: Queue<EmailJob>, payload: EmailJob): Promise<string | undefined> {
  const job = await queue.add('send-email', emailJobSchema.parse(payload));
  return job.id;
}

/** Redis key of one worker's heartbeat; /api/health counts the live ones. */
export const HEARTBEAT_TTL_SECONDS = 15;
export const HEARTBEAT_INTERVAL_MS = 5000;
export const heartbeatKeyPattern = (prefix: string) => `${prefix}:heartbeat:worker:*`;
export const heartbeatKey = (prefix: string, workerId: string) => `${prefix}:heartbeat:worker:${workerId}`;
