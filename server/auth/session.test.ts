import type { SessionData } from 'express-session';
import { describe, expect, it } from 'vitest';
import { SESSION_TOUCH_EVERY_MS, throttleTouch } from './session';

function fakeStore(fail = false) {
  const writes: string[] = [];
  return {
    writes,
    touch(sid: string, _sess: SessionData, cb?: (err?: unknown) => void) {
      writes.push(sid);
      cb?.(fail ? new Error('database down') : undefined);
    },
  };
}

const sess = {} as SessionData;

describe('throttleTouch', () => {
  it('writes a session expiry once per interval and again once the interval has passed', () => {
    let now = 1_000_000;
    const store = fakeStore();
    throttleTouch(store, SESSION_TOUCH_EVERY_MS, () => now);
    const done: unknown[] = [];
    for (let i = 0; i < 5; i++) store.touch('a', sess, (e) => done.push(e));
    expect(store.writes).toEqual(['a']);
    expect(done).toHaveLength(5); // every caller is answered, written or not
    store.touch('b', sess);
    expect(store.writes).toEqual(['a', 'b']);
    now += SESSION_TOUCH_EVERY_MS - 1;
    store.touch('a', sess);
    expect(store.writes).toEqual(['a', 'b']);
    now += 1;
    store.touch('a', sess);
    expect(store.writes).toEqual(['a', 'b', 'a']);
  });

  it('tries again on the next request when a write failed, and passes the error on', () => {
    const store = fakeStore(true);
    throttleTouch(store, SESSION_TOUCH_EVERY_MS, () => 0);
    const errors: unknown[] = [];
    store.touch('a', sess, (e) => errors.push(e));
    store.touch('a', sess, (e) => errors.push(e));
    expect(store.writes).toEqual(['a', 'a']);
    expect(errors.map((e) => (e as Error).message)).toEqual(['database down', 'database down']);
  });
});
