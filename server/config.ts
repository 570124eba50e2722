// Configuration from the environment, with safe development defaults (no secrets in the repo).
// Every process (server, mail sink, worker, seed) reads it through loadConfig().
import path from 'node:path';
import { z } from 'zod';
import { DEFAULT_DATABASE_URL } from '../db/client';

export const DEV_SESSION_SECRET = 'keel-development-session-secret-not-for-production';

const flag = z
  .enum(['1', '0', 'true', 'false', 'yes', 'no', ''], { error: 'must be 1/0, true/false or yes/no' })
  .transform((v) => v === '1' || v === 'true' || v === 'yes');

const port = (name: string) =>
  z.coerce
    .number({ error: `${name} must be a number` })
    .int({ error: `${name} must be a whole number` })
    .min(0, { error: `${name} must be 0..65535` })
    .max(65535, { error: `${name} must be 0..65535` });

const configSchema = z.object({
  NODE_ENV: z.string().default('development'),
  DATABASE_URL: z.string().min(1).default(DEFAULT_DATABASE_URL),
  REDIS_URL: z.string().min(1).default('redis://127.0.0.1:63799'), // the Redis of `npm start`
  HOST: z.string().min(1).default('127.0.0.1'),
  PORT: port('PORT').default(8080),
  SMTP_HOST: z.string().min(1).default('127.0.0.1'),
  SMTP_PORT: port('SMTP_PORT').default(2525),
  /** Public origin of the app, used in e-mailed links. */
  APP_URL: z.url({ error: 'APP_URL must be a URL' }).default('http://127.0.0.1:8080'),
  SESSION_SECRET: z.string().min(8, { error: 'SESSION_SECRET must be at least 8 characters' }).default(DEV_SESSION_SECRET),
  /** BullMQ key prefix (tests use unique prefixes so they never see each other's jobs). */
  QUEUE_PREFIX: z.string().min(1).default('keel'),
  WEB_DIST: z.string().min(1).default(path.resolve(__dirname, '..', 'dist')),
  /** Secure cookies and trust one proxy hop (TLS terminated in front of us). */
  COOKIE_SECURE: flag.default(false),
  MAIL_FROM: z.string().min(3).default('Keel <keel@tarrow.example>'),
  /** Longest age, ms, of a cached Watch/Trends query result (server/read-cache.ts); 0 turns the cache off. */
  READ_CACHE_MS: z.coerce
    .number({ error: 'READ_CACHE_MS must be a number of milliseconds' })
    .int({ error: 'READ_CACHE_MS must be a whole number of milliseconds' })
    .min(0, { error: 'READ_CACHE_MS must be 0..10000' })
    .max(10_000, { error: 'READ_CACHE_MS must be 0..10000' })
    .default(1000),
});

export interface Config {
  nodeEnv: string;
  production: boolean;
  databaseUrl: string;
  redisUrl: string;
  host: string;
  port: number;
  smtpHost: string;
  smtpPort: number;
  appUrl: string;
  sessionSecret: string;
  queuePrefix: string;
  webDist: string;
  cookieSecure: boolean;
  mailFrom: string;
  readCacheMs: number;
}

export class ConfigError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ConfigError';
  }
}

export function loadConfig(env: Record<string, string | undefined> = process.env, warn: (m: string) => void = console.warn): Config {
  // Empty variables count as unset, so `PORT= npm start` behaves like no PORT at all.
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ''));
  const parsed = configSchema.safeParse(present);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
    throw new ConfigError(`Bad configuration:\n  ${lines.join('\n  ')}`);
  }
  const c = parsed.data;
  const production = c.NODE_ENV === 'production';
  if (production && c.SESSION_SECRET === DEV_SESSION_SECRET) {
    // The development secret is in the repository: anyone could forge session cookies with it.
    throw new ConfigError(
      'Bad configuration:\n  SESSION_SECRET: NODE_ENV is production but SESSION_SECRET is the development default from the ' +
        "repository; set a long random secret (e.g. `node -e \"console.log(require('crypto').randomBytes(32).toString('base64url'))\"`)",
    );
  }
  if (production && c.SESSION_SECRET.length < 32) {
    warn('[config] SESSION_SECRET is short: use at least 32 random characters in production');
  }
  return {
    nodeEnv: c.NODE_ENV,
    production,
    databaseUrl: c.DATABASE_URL,
    redisUrl: c.REDIS_URL,
    host: c.HOST,
    port: c.PORT,
    smtpHost: c.SMTP_HOST,
    smtpPort: c.SMTP_PORT,
    appUrl: c.APP_URL.replace(/\/+$/, ''),
    sessionSecret: c.SESSION_SECRET,
    queuePrefix: c.QUEUE_PREFIX,
    webDist: path.resolve(c.WEB_DIST),
    cookieSecure: c.COOKIE_SECURE,
    mailFrom: c.MAIL_FROM,
    readCacheMs: c.READ_CACHE_MS,
  };
}
