// Health reporting and outages: the worker's heartbeat, and the API answering 503 (not 500, not a
// crash) while PostgreSQL or Redis is unreachable, then recovering by itself when it returns.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClient } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { startTcpProxy, type TcpProxy } from '../helpers/tcp-proxy';

let stack: Stack;
beforeAll(async () => {
  stack = await startStack({ worker: true, mailSink: false });
});
afterAll(async () => {
  if (process.env.KEEL_DEBUG_LOGS) console.log(stack?.logs.join('\n'));
  await stack?.stop();
});

const health = async () => {
  const r = await fetch(`${stack.baseUrl}/api/health`);
  return { status: r.status, body: (await r.json()) as Record<string, unknown> };
};

describe('health', () => {
  it('reports database, Redis and a running worker', async () => {
    const h = await health();
    expect(h.status).toBe(200);
    expect(h.body).toMatchObject({ status: 'ok', database: 'ok', redis: 'ok', worker: 'ok', workers: 1 });
  });

  it('reports the worker absent once it stopped (SIGTERM), and ok again after a restart', async () => {
    await stack.stopWorker('SIGTERM');
    const h = await health();
    expect(h.status).toBe(200); // a missing worker degrades jobs, not the API
    expect(h.body).toMatchObject({ worker: 'absent', workers: 0 });
    expect(stack.logs.some((l) => l.includes('[worker]') && l.includes('SIGTERM: finishing current jobs'))).toBe(true);
    await stack.startWorker();
    expect((await health()).body.worker).toBe('ok');
  });
});

describe('outages', () => {
  let pgProxy: TcpProxy;
  let redisProxy: TcpProxy;
  const original: Record<string, string> = {};

  beforeAll(async () => {
    const db = new URL(stack.databaseUrl);
    const redis = new URL(stack.redisUrl);
    pgProxy = await startTcpProxy({ host: db.hostname, port: Number(db.port) });
    redisProxy = await startTcpProxy({ host: redis.hostname, port: Number(redis.port) });
    original.DATABASE_URL = stack.env.DATABASE_URL;
    original.REDIS_URL = stack.env.REDIS_URL;
    db.port = String(pgProxy.port);
    redis.port = String(redisProxy.port);
    // The stack restarts the server with its (mutable) env: route only the server through the relays.
    stack.env.DATABASE_URL = db.toString();
    stack.env.REDIS_URL = redis.toString();
    await stack.restartServer();
  });
  afterAll(async () => {
    Object.assign(stack.env, original);
    await pgProxy?.stop();
    await redisProxy?.stop();
  });

  it('PostgreSQL away: API routes answer 503 UNAVAILABLE, health says database down; it recovers', async () => {
    const c = createClient(stack.baseUrl);
    expect((await c.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
    expect((await c.get('/api/network/areas')).status).toBe(200);

    await pgProxy.cut();
    const me = await c.get('/api/auth/me');
    expect(me.status).toBe(503);
    expect(me.body.error.code).toBe('UNAVAILABLE');
    const write = await c.post('/api/network/areas', { code: 'during-outage', name: 'During outage' });
    expect(write.status).toBe(503);
    expect(write.body.error.code).toBe('UNAVAILABLE');
    const anonymous = await createClient(stack.baseUrl).get('/api/auth/csrf');
    expect(anonymous.status).toBe(503);
    const h = await health();
    expect(h.status).toBe(503);
    expect(h.body).toMatchObject({ status: 'degraded', database: 'down', redis: 'ok' });

    await pgProxy.restore();
    const back = await waitFor(async () => {
      const r = await c.get('/api/auth/me');
      return r.status === 200 ? r : null;
    }, 'the API to recover');
    expect(back.body.person.email).toBe(ROLE_EMAIL.engineer); // the session survived the outage
    expect((await health()).status).toBe(200);
    const none = await stack.pool.query(`select count(*)::int as n from areas where code = 'during-outage'`);
    expect(none.rows[0].n).toBe(0);
  });

  it('Redis away: health 503 with redis down; an invitation cannot be queued → 503 and nothing is stored; it recovers', async () => {
    const admin = createClient(stack.baseUrl);
    expect((await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD)).status).toBe(200);
    await redisProxy.cut();
    const h = await health();
    expect(h.status).toBe(503);
    expect(h.body).toMatchObject({ database: 'ok', redis: 'down' });

    const before = await rowCounts(stack.pool);
    const r = await admin.post('/api/invitations', { email: 'queued.later@tarrow.example', role: 'operator' });
    expect(r.status).toBe(503);
    expect(r.body.error.code).toBe('UNAVAILABLE');
    expect(await rowCounts(stack.pool)).toEqual(before);

    await redisProxy.restore();
    await waitFor(async () => (await health()).status === 200, 'Redis to come back');
    const retry = await admin.post('/api/invitations', { email: 'queued.later@tarrow.example', role: 'operator' });
    expect(retry.status).toBe(201);
  });

  it('the server process is still the one that started (no crash during the outages)', async () => {
    const starts = stack.logs.filter((l) => l.startsWith('[server]') && l.includes('listening on'));
    // One start by the stack, one restart onto the relays; none after a crash.
    expect(starts).toHaveLength(2);
  });
});
