// What the analysis processors need from the outside: the database, the live-event publisher, the
// analysis queues (to chain the next job) and the e-mail queue. One per process, built lazily from
// the environment, so a sandboxed processor (its own child process) gets its own connections.
import type { Queue } from 'bullmq';
import { Redis } from 'ioredis';
import type pg from 'pg';
import { createDb, createPool, type Db } from '../../db/client';
import { loadConfig } from '../../server/config';
import { consoleLogger, type Logger } from '../../server/deps';
import { createEventPublisher, eventChannel, type EventPublisher } from '../../server/events/bus';
import { createEmailQueue, type EmailJob } from '../queues';
import { createAnalysisQueues, type AnalysisQueues } from './analysis-queues';

export interface AnalysisContext {
  db: Db;
  pool: pg.Pool;
  events: EventPublisher;
  queues: AnalysisQueues;
  emailQueue: Queue<EmailJob>;
  appUrl: string;
  log: Logger;
  close(): Promise<void>;
}

export function createAnalysisContext(env: NodeJS.ProcessEnv = process.env, tag = 'analysis'): AnalysisContext {
  const config = loadConfig(env);
  const log = consoleLogger(tag);
  const pool: pg.Pool = createPool(config.databaseUrl, { max: 3, onError: (e) => log.warn(`database connection lost: ${e.message}`) });
  const db = createDb(pool);
  // BullMQ needs maxRetriesPerRequest: null on the connections it blocks on; this one only
  // publishes events and adds jobs, but sharing the setting keeps queues happy.
  const redis = new Redis(config.redisUrl, { maxRetriesPerRequest: null });
  redis.on('error', (e: Error) => log.warn(`redis: ${e.message}`));
  const events = createEventPublisher(redis, eventChannel(config.queuePrefix));
  const queues = createAnalysisQueues(redis, config.queuePrefix);
  const emailQueue = createEmailQueue(redis, config.queuePrefix);
  emailQueue.on('error', (e: Error) => log.warn(`email queue: ${e.message}`));
  return {
    db,
    pool,
    events,
    queues,
    emailQueue,
    appUrl: config.appUrl,
    log,
    async close() {
      await queues.close();
      await emailQueue.close().catch(() => undefined);
      await redis.quit().catch(() => redis.disconnect());
      await pool.end().catch(() => undefined);
    },
  };
}

let shared: AnalysisContext | null = null;

/** The process-wide context (sandboxed processors keep one for the child's life). */
export function analysisContext(): AnalysisContext {
  if (!shared) shared = createAnalysisContext();
  return shared;
}

/** Minimal view of a BullMQ job that both sandboxed and in-process jobs satisfy. */
export interface JobLike {
  id?: string;
  data: unknown;
  attemptsMade: number;
  opts: { attempts?: number };
  updateProgress(progress: number | object): Promise<void>;
}

/** True when this attempt is the job's last (no retry follows a failure). */
export function isLastAttempt(job: JobLike): boolean {
  return job.attemptsMade + 1 >= (job.opts.attempts ?? 1);
}
