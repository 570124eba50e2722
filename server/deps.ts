// What the app needs from the outside world, built once per process from the configuration and
// closed in reverse order on shutdown. Tests can build their own (e.g. with ioredis-mock).
import { Redis } from 'ioredis';
import type pg from 'pg';
import { createDb, createPool, type Db } from '../db/client';
import { createEmailQueue, enqueueEmail, type EmailJob } from '../jobs/queues';
import type { Config } from './config';

export interface Mailer {
  /** Queue an e-mail for the worker (resolves once the job is stored in Redis). */
  send(message: EmailJob): Promise<void>;
}

export interface Logger {
  info(msg: string): void;
  warn(msg: string): void;
  error(msg: string, err?: unknown): void;
}

export const consoleLogger = (tag: string): Logger => ({
  info: (m) => console.log(`[${tag}] ${m}`),
  warn: (m) => console.warn(`[${tag}] ${m}`),
  error: (m, err) => console.error(`[${tag}] ${m}`, err instanceof Error ? (err.stack ?? err.message) : (err ?? '')),
});

export interface Deps {
  config: Config;
  pool: pg.Pool;
  db: Db;
  /** General-purpose Redis client (health checks, worker heartbeats). */
  redis: Redis;
  mailer: Mailer;
  log: Logger;
  now(): Date;
}

export interface OwnedDeps extends Deps {
  close(): Promise<void>;
}

const REDIS_COMMAND_TIMEOUT_MS = 3000;

export function createDeps(config: Config, log: Logger = consoleLogger('server')): OwnedDeps {
  const pool = createPool(config.databaseUrl, { onError: (e) => log.warn(`database connection lost: ${e.message}`) });
  const db = createDb(pool);
  // Commands fail after a few seconds instead of waiting forever while Redis is away, so the
  // API answers 503 and recovers by itself when Redis returns.
  const redis = new Redis(config.redisUrl, {
    maxRetriesPerRequest: 1,
    commandTimeout: REDIS_COMMAND_TIMEOUT_MS,
    lazyConnect: false,
  });
  let redisDown = false;
  redis.on('error', (e: Error) => {
    if (!redisDown) log.warn(`redis: ${e.message}`);
    redisDown = true;
  });
  redis.on('ready', () => {
    if (redisDown) log.info('redis is back');
    redisDown = false;
  });
  const emailQueue = createEmailQueue(redis, config.queuePrefix);
  emailQueue.on('error', (e: Error) => log.warn(`email queue: ${e.message}`));
  return {
    config,
    pool,
    db,
    redis,
    log,
    now: () => new Date(),
    mailer: { send: (message) => enqueueEmail(emailQueue, message).then(() => undefined) },
    async close() {
      await emailQueue.close().catch(() => undefined);
      await redis.quit().catch(() => redis.disconnect());
      await pool.end().catch(() => undefined);
    },
  };
}
