import { describe, expect, it } from 'vitest';
import { createReadCache } from './read-cache';

function deferred<T>() {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  return { promise, resolve, reject };
}

describe('read cache', () => {
  it('serves a value for ttlMs, then computes it again', async () => {
    let now = 0;
    let calls = 0;
    const cache = createReadCache({ ttlMs: 1000, nowMs: () => now });
    const compute = async () => ++calls;
    expect(await cache.get('k', compute)).toBe(1);
    now = 999;
    expect(await cache.get('k', compute)).toBe(1);
    now = 1000;
    expect(await cache.get('k', compute)).toBe(2);
    expect(await cache.get('other', compute)).toBe(3);
    expect(cache.stats()).toMatchObject({ hits: 1, misses: 3, size: 2 });
  });

  it('shares one computation among concurrent callers of a key', async () => {
    const d = deferred<string>();
    let calls = 0;
    const cache = createReadCache({ ttlMs: 1000, nowMs: () => 0 });
    const compute = () => {
      calls++;
      return d.promise;
    };
    const all = Promise.all([cache.get('k', compute), cache.get('k', compute), cache.get('k', compute)]);
    d.resolve('v');
    expect(await all).toEqual(['v', 'v', 'v']);
    expect(calls).toBe(1);
  });

  it('after invalidate() computes afresh, and does not keep a computation that was in flight', async () => {
    const first = deferred<string>();
    const values = [first.promise, Promise.resolve('fresh'), Promise.resolve('fresher')];
    let calls = 0;
    const cache = createReadCache({ ttlMs: 10_000, nowMs: () => 0 });
    const compute = () => values[calls++];
    const early = cache.get('k', compute);
    cache.invalidate(); // e.g. a scan stored windows while the old snapshot was being read
    const late = cache.get('k', compute);
    first.resolve('old');
    expect(await early).toBe('old'); // its callers still get an answer
    expect(await late).toBe('fresh');
    expect(await cache.get('k', compute)).toBe('fresh'); // the in-flight 'old' was never stored
    cache.invalidate();
    expect(await cache.get('k', compute)).toBe('fresher');
    expect(calls).toBe(3);
    expect(cache.stats().invalidations).toBe(2);
  });

  it('does not keep a failure: the next caller tries again', async () => {
    let calls = 0;
    const cache = createReadCache({ ttlMs: 10_000, nowMs: () => 0 });
    const compute = async () => {
      calls++;
      if (calls === 1) throw new Error('database down');
      return 'ok';
    };
    await expect(cache.get('k', compute)).rejects.toThrow('database down');
    expect(await cache.get('k', compute)).toBe('ok');
    expect(calls).toBe(2);
  });

  it('keeps at most maxEntries keys, dropping the least recently computed', async () => {
    let calls = 0;
    const cache = createReadCache({ ttlMs: 10_000, maxEntries: 2, nowMs: () => 0 });
    const compute = async () => ++calls;
    await cache.get('a', compute);
    await cache.get('b', compute);
    await cache.get('c', compute); // drops 'a'
    expect(cache.stats().size).toBe(2);
    expect(await cache.get('b', compute)).toBe(2);
    expect(await cache.get('a', compute)).toBe(4);
  });

  it('with ttlMs 0 computes on every call (the cache turned off)', async () => {
    let calls = 0;
    const cache = createReadCache({ ttlMs: 0 });
    const compute = async () => ++calls;
    expect([await cache.get('k', compute), await cache.get('k', compute)]).toEqual([1, 2]);
  });
});
