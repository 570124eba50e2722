// A shared counter store for express-rate-limit on Redis, so every server process counts against
// the same limits (with in-memory counters, N processes would allow N times the attempts).
//
// One fixed window per key, as express-rate-limit's own memory store: the first hit creates the
// counter with its expiry, later hits only count. One Lua script does both, so a key can never be
// left without an expiry and two processes never both start a window.
//
// When Redis does not answer, the store throws and the limiter lets the request through
// (passOnStoreError): signing in stays possible while Redis is away — the password check is what
// protects the account; the limit only slows guessing — and a warning is logged.
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import type { Redis } from 'ioredis';

/** KEYS[1]: the counter; ARGV[1]: the window, ms. Returns { hits, ms until the window ends }. */
const INCREMENT = `
local ttl = redis.call('PTTL', KEYS[1])
if ttl <= 0 then
  redis.call('SET', KEYS[1], 1, 'PX', ARGV[1])
  return { 1, tonumber(ARGV[1]) }
end
return { redis.call('INCR', KEYS[1]), ttl }`;

export class RedisRateStore implements Store {
  readonly localKeys = false;
  readonly prefix: string;
  private windowMs = 60_000;

  constructor(
    private readonly redis: Redis,
    prefix: string,
    private readonly warn: (message: string) => void = () => undefined,
  ) {
    this.prefix = prefix;
  }

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  private key(key: string): string {
    return `${this.prefix}${key}`;
  }

  private async run<T>(what: string, f: () => Promise<T>): Promise<T> {
    try {
      return await f();
    } catch (err) {
      this.warn(`rate limit store (${what}): ${(err as Error).message}; the request is let through`);
      throw err;
    }
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    return this.run('get', async () => {
      const k = this.key(key);
      const [hits, ttl] = await Promise.all([this.redis.get(k), this.redis.pttl(k)]);
      if (hits === null) return undefined;
      return { totalHits: Number(hits), resetTime: ttl > 0 ? new Date(Date.now() + ttl) : undefined };
    });
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    return this.run('increment', async () => {
      const [hits, ttl] = (await this.redis.eval(INCREMENT, 1, this.key(key), String(this.windowMs))) as [number, number];
      return { totalHits: Number(hits), resetTime: new Date(Date.now() + Number(ttl)) };
    });
  }

  async decrement(key: string): Promise<void> {
    await this.run('decrement', async () => {
      const k = this.key(key);
      // only while the window lasts: a DECR on an expired key would start a counter at -1 forever
      await this.redis.eval(`if redis.call('EXISTS', KEYS[1]) == 1 then return redis.call('DECR', KEYS[1]) end return 0`, 1, k);
    });
  }

  async resetKey(key: string): Promise<void> {
    await this.run('reset', async () => {
      await this.redis.del(this.key(key));
    });
  }
}
