// The Redis counter store of the rate limits, on ioredis-mock (two short Lua scripts: the
// counting with its window, and the guarded DECR).
import RedisMock from 'ioredis-mock';
import type { Redis } from 'ioredis';
import type { Options } from 'express-rate-limit';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { RedisRateStore } from './redis-rate-store';

let redis: Redis;

beforeEach(() => {
  redis = new RedisMock() as unknown as Redis;
});
afterEach(async () => {
  await redis.flushall();
  redis.disconnect();
});

function store(prefix = 'keel-t:rate:x:', windowMs = 60_000, warn?: (m: string) => void) {
  const s = new RedisRateStore(redis, prefix, warn);
  s.init({ windowMs } as Options);
  return s;
}

describe('RedisRateStore', () => {
  it('counts hits per key within one window whose expiry the first hit sets', async () => {
    const s = store();
    const t0 = Date.now();
    const first = await s.increment('127.0.0.1|a@tarrow.example');
    expect(first.totalHits).toBe(1);
    expect(first.resetTime!.getTime()).toBeGreaterThanOrEqual(t0 + 59_000);
    expect(first.resetTime!.getTime()).toBeLessThanOrEqual(Date.now() + 60_000);
    expect((await s.increment('127.0.0.1|a@tarrow.example')).totalHits).toBe(2);
    expect((await s.increment('127.0.0.1|b@tarrow.example')).totalHits).toBe(1);
    expect(await redis.pttl('keel-t:rate:x:127.0.0.1|a@tarrow.example')).toBeGreaterThan(59_000);
    expect((await s.get('127.0.0.1|a@tarrow.example'))?.totalHits).toBe(2);
    expect(await s.get('nobody')).toBeUndefined();
  });

  it('later hits do not extend the window (a fixed window, as the memory store)', async () => {
    const s = store('p:', 400);
    await s.increment('k');
    await new Promise((r) => setTimeout(r, 200));
    await s.increment('k');
    const ttl = await redis.pttl('p:k');
    expect(ttl).toBeGreaterThan(0);
    expect(ttl).toBeLessThan(300); // the second hit left the first hit's expiry alone
  });

  it('two stores on one Redis with one prefix share the count (two server processes)', async () => {
    const a = store();
    const b = store();
    await a.increment('k');
    await b.increment('k');
    expect((await a.increment('k')).totalHits).toBe(3);
    // another deployment's prefix counts apart
    expect((await store('other:rate:x:').increment('k')).totalHits).toBe(1);
  });

  it('decrements (a successful sign-in does not count) and resets', async () => {
    const s = store();
    await s.increment('k');
    await s.increment('k');
    await s.decrement('k');
    expect((await s.get('k'))?.totalHits).toBe(1);
    await s.resetKey('k');
    expect(await s.get('k')).toBeUndefined();
    // a decrement after the window ended leaves nothing behind
    await s.decrement('k');
    expect(await redis.exists('keel-t:rate:x:k')).toBe(0);
  });

  it('warns and throws when Redis fails, so the limiter lets the request through', async () => {
    const warn = vi.fn();
    const s = store('p:', 60_000, warn);
    vi.spyOn(redis, 'eval').mockImplementation(() => {
      throw new Error('Connection is closed.');
    });
    await expect(s.increment('k')).rejects.toThrow('Connection is closed.');
    expect(warn).toHaveBeenCalledWith('rate limit store (increment): Connection is closed.; the request is let through');
  });
});
