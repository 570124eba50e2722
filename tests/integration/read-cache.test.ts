// The server's read cache (server/read-cache.ts) on a real stack with a long lifetime (10 s, so
// nothing here depends on timing): a change made behind the server's back stays unseen while the
// entry lives — which shows the cache is really in the path — and every way the server learns of
// a change empties it at once: a live event on Redis (what workers publish when a scan stores
// windows or an alert moves), a state-changing request (a track's thresholds edited), a role change
// (the signed-in person is cached too).
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fillEstimates } from '../../scripts/bench/fill-year';
import { eventChannel } from '../../server/events/bus';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const DAY = 86_400;
/** Midnight UTC after the last filled day. */
const END_DAY = Date.UTC(2025, 5, 4) / 1000;

let stack: Stack;
let admin: Client;
let engineer: Client;
let planner: Client;
let publisher: Redis;
let ns: number;

beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false, env: { READ_CACHE_MS: '10000' } });
  publisher = new Redis(stack.redisUrl);
  admin = createClient(stack.baseUrl);
  engineer = createClient(stack.baseUrl);
  planner = createClient(stack.baseUrl);
  await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD);
  await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
  await planner.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
  ns = (await stack.pool.query(`select id from mode_tracks where code = 'north-south'`)).rows[0].id;
  await fillEstimates(stack.pool, { days: 2, endDay: END_DAY, seed: 5 }); // the two days before END_DAY
}, 180_000);

afterAll(async () => {
  publisher?.disconnect();
  await stack?.stop();
});

describe('read cache', () => {
  it('serves Trends from the cache until a live event on Redis empties it', async () => {
    const q = `from=${new Date((END_DAY - 2 * DAY) * 1000).toISOString()}&to=${new Date(END_DAY * 1000).toISOString()}&maxPoints=30`;
    const url = `/api/tracks/north-south/estimates?${q}`;
    const clean = (await planner.get(url)).body;
    expect(clean.bucketSeconds).toBe(7200); // two days / 30 → 2-hour buckets from the hourly rollups
    const hour = END_DAY - DAY + 4 * 3600;
    await stack.pool.query(`update estimate_rollups set damping_min = -42 where track_id = $1 and span_seconds = 3600 and start = to_timestamp($2)`, [ns, hour]);
    try {
      // changed behind the server's back: the cached answer is still served
      expect((await planner.get(url)).body).toEqual(clean);
      // what a worker publishes when a scan has stored windows
      const heard = await publisher.publish(
        eventChannel(stack.queuePrefix),
        JSON.stringify({ type: 'analysis.progress', analysisId: 1, recordingId: 1, kind: 'scan', status: 'running', progress: 0.5, error: null, at: new Date().toISOString() }),
      );
      expect(heard).toBeGreaterThanOrEqual(1); // the server's subscription
      await expect
        .poll(async () => (await planner.get(url)).body.buckets.filter((b: { dampingMin: number }) => b.dampingMin === -42).length, { timeout: 5000, interval: 50 })
        .toBe(1);
    } finally {
      await stack.pool.query(`select estimate_rollups_rebuild(to_timestamp($1), to_timestamp($1))`, [hour]);
    }
  });

  it('shows a track edited through the API on Watch at once', async () => {
    const poorOf = (body: { tracks: { code: string; poorBelow: number }[] }) => body.tracks.find((t) => t.code === 'north-south')!.poorBelow;
    const before = (await engineer.get('/api/watch')).body;
    expect(poorOf(before)).toBe(3);
    // behind the server's back: not seen while cached
    await stack.pool.query(`update mode_tracks set poor_below = 2.9 where id = $1`, [ns]);
    expect(poorOf((await engineer.get('/api/watch')).body)).toBe(3);
    // through the API: seen on the very next request
    const r = await engineer.patch(`/api/network/tracks/${ns}`, { poorBelow: 2.5 });
    expect(r.status).toBe(200);
    expect(poorOf((await engineer.get('/api/watch')).body)).toBe(2.5);
    expect((await engineer.patch(`/api/network/tracks/${ns}`, { poorBelow: 3 })).status).toBe(200);
    expect(poorOf((await engineer.get('/api/watch')).body)).toBe(3);
  });

  it('applies a role change to the very next request of that person', async () => {
    const me = (await planner.get('/api/auth/me')).body;
    expect(me.person.role).toBe('planner');
    const study = `/api/studies/transfer?track=north-south&from=${new Date((END_DAY - 2 * DAY) * 1000).toISOString()}&to=${new Date(END_DAY * 1000).toISOString()}`;
    expect((await planner.get(study)).status).toBe(200);
    const id = me.person.id;
    try {
      expect((await admin.patch(`/api/people/${id}`, { role: 'operator' })).status).toBe(200);
      expect((await planner.get('/api/auth/me')).body.person.role).toBe('operator');
      expect((await planner.get(study)).status).toBe(403); // operators do not run studies
    } finally {
      expect((await admin.patch(`/api/people/${id}`, { role: 'planner' })).status).toBe(200);
    }
    expect((await planner.get(study)).status).toBe(200);
  });
});
