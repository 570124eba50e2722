// Rate limits on the routes that guess at secrets or send e-mail. The counters live in Redis
// (server/auth/redis-rate-store.ts), shared by every server process of the deployment and kept
// over a server restart; keys are under the deployment's QUEUE_PREFIX.
import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { Redis } from 'ioredis';
import { errorBody, RateLimitedError } from '../errors';
import type { RateLimitName } from '../routes/registry';
import { RedisRateStore } from './redis-rate-store';

const MINUTE = 60_000;

const emailOf = (req: Request) =>
  String((req.body as { email?: unknown } | undefined)?.email ?? '')
    .trim()
    .toLowerCase();
const ipOf = (req: Request) => ipKeyGenerator(req.ip ?? 'unknown');

export interface RateLimitStoreOptions {
  redis: Redis;
  /** Key prefix of this deployment (the BullMQ prefix): tests sharing one Redis never meet. */
  prefix: string;
  warn(message: string): void;
}

function limiter(opts: {
  /** Names this limiter's counters in Redis. */
  name: string;
  store: RateLimitStoreOptions;
  windowMs: number;
  limit: number;
  key: (req: Request) => string;
  message: string;
  skipSuccessfulRequests?: boolean;
}): RequestHandler {
  return rateLimit({
    windowMs: opts.windowMs,
    limit: opts.limit,
    keyGenerator: opts.key,
    skipSuccessfulRequests: opts.skipSuccessfulRequests ?? false,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: new RedisRateStore(opts.store.redis, `${opts.store.prefix}:rate:${opts.name}:`, opts.store.warn),
    passOnStoreError: true,
    handler: (_req, res) => {
      res.status(429).json(errorBody(new RateLimitedError(opts.message)));
    },
  });
}

/** Both limits apply: the first that is exhausted answers 429. */
function both(first: RequestHandler, second: RequestHandler): RequestHandler {
  return (req, res, next) => {
    void first(req, res, (err?: unknown) => (err ? next(err) : void second(req, res, next)));
  };
}

/** Failed sign-ins from one address over all e-mails (password spraying) per 15 minutes. */
export const SIGN_IN_ADDRESS_LIMIT = 50;
/** Reset requests from one address over all e-mails (mail flooding) per 15 minutes. */
export const PASSWORD_RESET_ADDRESS_LIMIT = 20;

export function createRateLimits(store: RateLimitStoreOptions): Record<RateLimitName, RequestHandler> {
  return {
    // 10 failed attempts per minute for one address and e-mail; successful sign-ins do not count,
    // so the 11th attempt after ten wrong passwords is refused even with the right one. Over all
    // e-mails, one address gets 50 failures per 15 minutes: guessing one common password across
    // many accounts would otherwise never meet the per-e-mail limit.
    signIn: both(
      limiter({
        name: 'sign-in-address',
        store,
        windowMs: 15 * MINUTE,
        limit: SIGN_IN_ADDRESS_LIMIT,
        key: ipOf,
        message: 'Too many failed sign-ins from this address; wait a few minutes and try again',
        skipSuccessfulRequests: true,
      }),
      limiter({
        name: 'sign-in',
        store,
        windowMs: MINUTE,
        limit: 10,
        key: (req) => `${ipOf(req)}|${emailOf(req)}`,
        message: 'Too many sign-in attempts; wait a minute and try again',
        skipSuccessfulRequests: true,
      }),
    ),
    invitations: limiter({
      name: 'invitations',
      store,
      windowMs: 15 * MINUTE,
      limit: 30,
      key: (req) => `${ipOf(req)}|${(req.user as { id?: number } | undefined)?.id ?? ''}`,
      message: 'Too many invitations in a short time; wait a few minutes',
    }),
    // 5 per address and e-mail, and 20 per address over all e-mails (each may send an e-mail).
    passwordReset: both(
      limiter({
        name: 'reset-address',
        store,
        windowMs: 15 * MINUTE,
        limit: PASSWORD_RESET_ADDRESS_LIMIT,
        key: ipOf,
        message: 'Too many password-reset requests from this address; wait a few minutes',
      }),
      limiter({
        name: 'reset',
        store,
        windowMs: 15 * MINUTE,
        limit: 5,
        key: (req) => `${ipOf(req)}|${emailOf(req)}`,
        message: 'Too many password-reset requests; wait a few minutes',
      }),
    ),
    // Accepting an invitation / completing a reset / looking a token up: tokens are 256-bit, this
    // only stops a runaway client.
    linkTokens: limiter({
      name: 'link-tokens',
      store,
      windowMs: 15 * MINUTE,
      limit: 60,
      key: ipOf,
      message: 'Too many attempts with links; wait a few minutes',
    }),
  };
}
