// Security properties of the running server that auth.test.ts does not already cover:
//  - CSRF on EVERY state-changing route of the catalogue (shared/api/endpoints.ts): no token, a
//    wrong token, or no session at all → 403 CSRF, and nothing changes;
//  - ending sessions: disabling a person ends all of their sessions and their open live-event
//    streams, and enabling them again does not bring old cookies back; signing out ends the
//    stream of that session;
//  - rate limits on invitations, password-reset requests (per e-mail and per address), link
//    tokens and sign-in (per address over all e-mails); X-Forwarded-For does not get around them
//    unless a proxy is trusted;
//  - behind a TLS-terminating proxy (COOKIE_SECURE=1, X-Forwarded-Proto: https): Secure, HttpOnly,
//    SameSite cookies, HSTS, and no session cookie at all over plain http;
//  - the server refuses to start in production with the development session secret.
import { spawn } from 'node:child_process';
import http from 'node:http';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildPath } from '../../shared/api/common';
import { ENDPOINT_KEYS, ENDPOINTS, STATE_CHANGING_METHODS } from '../../shared/api/endpoints';
import { PASSWORD_RESET_ADDRESS_LIMIT, SIGN_IN_ADDRESS_LIMIT } from '../../server/auth/rate-limits';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, insertPerson, ROLE_EMAIL, rowCounts, unique, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const repoRoot = path.resolve(__dirname, '..', '..');
let stack: Stack;

beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
});
afterAll(async () => {
  await stack?.stop();
});

const signedIn = async (email: string): Promise<Client> => {
  const c = createClient(stack.baseUrl);
  const r = await c.signIn(email, DEMO_PASSWORD);
  expect(r.status, `sign-in of ${email}`).toBe(200);
  return c;
};

// ---------------------------------------------------------------- CSRF, table-driven

const STATE_CHANGING = ENDPOINT_KEYS.filter((k) => STATE_CHANGING_METHODS.includes(ENDPOINTS[k].method));

describe('CSRF on every state-changing route', () => {
  let admin: Client;
  beforeAll(async () => {
    admin = await signedIn(ROLE_EMAIL.admin);
  });

  it('the catalogue has the state-changing routes this table expects', () => {
    expect(STATE_CHANGING.length).toBeGreaterThanOrEqual(30);
    for (const k of ['auth.signIn', 'auth.signOut', 'people.update', 'invitations.accept', 'passwordReset.complete', 'recordings.upload', 'alerts.acknowledge'] as const) {
      expect(STATE_CHANGING).toContain(k);
    }
  });

  it.each(STATE_CHANGING.map((k) => [k, ENDPOINTS[k].method, ENDPOINTS[k].path] as const))(
    '%s (%s %s): no token, a wrong token, no session → 403 CSRF, nothing changed',
    async (key, method, p) => {
      const other = createClient(stack.baseUrl);
      const otherToken = await other.fetchCsrf();
      const anonymous = createClient(stack.baseUrl);
      // Placeholder ids: the CSRF check comes before anything reads them.
      const url = buildPath(p, Object.fromEntries([...p.matchAll(/:([A-Za-z_]+)/g)].map((m) => [m[1], m[1] === 'token' ? 'x'.repeat(43) : 1])));
      const before = await rowCounts(stack.pool);
      const attempts = [
        { who: 'admin, no token', r: await admin.request(method, url, {}, { csrf: false }) },
        { who: "admin, another session's token", r: await admin.request(method, url, {}, { csrf: otherToken }) },
        { who: 'admin, an invented token', r: await admin.request(method, url, {}, { csrf: 'A'.repeat(43) }) },
        { who: 'no session, no token', r: await anonymous.request(method, url, {}, { csrf: false }) },
      ];
      for (const { who, r } of attempts) {
        expect(r.status, `${key} as ${who}: ${JSON.stringify(r.body)}`).toBe(403);
        expect(r.body.error.code, who).toBe('CSRF');
      }
      expect(await rowCounts(stack.pool)).toEqual(before);
      // the admin session is still fine (sign-out without a token did not sign out)
      expect((await admin.get('/api/auth/me')).status).toBe(200);
    },
  );
});

// ---------------------------------------------------------------- ending sessions

interface OpenStream {
  status: number;
  ended: Promise<'ended'>;
  close(): void;
}

function openEvents(client: Client): Promise<OpenStream> {
  return new Promise((resolve, reject) => {
    const req = http.get(`${stack.baseUrl}/api/events`, { headers: { Cookie: client.cookieHeader(), Accept: 'text/event-stream' } }, (res) => {
      const ended = new Promise<'ended'>((done) => {
        res.on('end', () => done('ended'));
        res.on('close', () => done('ended'));
      });
      res.resume();
      resolve({ status: res.statusCode ?? 0, ended, close: () => req.destroy() });
    });
    req.on('error', (e) => (e.message.includes('socket hang up') ? undefined : reject(e)));
  });
}

const within = <T>(p: Promise<T>, ms: number) =>
  Promise.race([p, new Promise<'still open'>((r) => setTimeout(() => r('still open'), ms))]);

describe('ending sessions', () => {
  it('disabling a person ends every session and open event stream of theirs; enabling does not revive old cookies', async () => {
    const admin = await signedIn(ROLE_EMAIL.admin);
    const id = await insertPerson(stack.pool, 'operator');
    const email = (await stack.pool.query('select email from people where id = $1', [id])).rows[0].email as string;
    // the throwaway operator gets the demo password (the hash of a seeded account)
    await stack.pool.query('update people set password_hash = (select password_hash from people where email = $1) where id = $2', [ROLE_EMAIL.operator, id]);
    const phone = await signedIn(email);
    const desk = await signedIn(email);
    const stream = await openEvents(desk);
    expect(stream.status).toBe(200);
    expect(await within(stream.ended, 1000)).toBe('still open');

    expect((await admin.patch(`/api/people/${id}`, { disabled: true })).status).toBe(200);
    expect((await phone.get('/api/auth/me')).status).toBe(401);
    expect((await desk.get('/api/auth/me')).status).toBe(401);
    // the stream re-checks its session every 5 s
    expect(await within(stream.ended, 15_000)).toBe('ended');
    expect((await openEvents(desk)).status).toBe(401);

    expect((await admin.patch(`/api/people/${id}`, { disabled: false })).status).toBe(200);
    expect((await phone.get('/api/auth/me')).status).toBe(401);
    expect((await desk.get('/api/auth/me')).status).toBe(401);
    expect((await createClient(stack.baseUrl).signIn(email, DEMO_PASSWORD)).status).toBe(200);
  });

  it("signing out ends that session's event stream, not another session's", async () => {
    const a = await signedIn(ROLE_EMAIL.planner);
    const b = await signedIn(ROLE_EMAIL.planner);
    const sa = await openEvents(a);
    const sb = await openEvents(b);
    expect([sa.status, sb.status]).toEqual([200, 200]);
    expect((await a.signOut()).status).toBe(200);
    expect(await within(sa.ended, 15_000)).toBe('ended');
    expect(await within(sb.ended, 500)).toBe('still open');
    sb.close();
  });
});

// ---------------------------------------------------------------- rate limits

describe('rate limits', () => {
  // Counters live in the server process: start from fresh ones.
  beforeAll(async () => {
    await stack.restartServer();
  });

  it('invitations: the 31st within 15 minutes gets 429 and invites nobody', async () => {
    const admin = await signedIn(ROLE_EMAIL.admin);
    for (let i = 0; i < 30; i++) {
      const r = await admin.post('/api/invitations', { email: `${unique('limit')}@tarrow.example`, role: 'planner' });
      expect(r.status, `invitation ${i + 1}: ${JSON.stringify(r.body)}`).toBe(201);
    }
    const before = (await stack.pool.query('select count(*)::int as n from invitations')).rows[0].n;
    const r = await admin.post('/api/invitations', { email: `${unique('limit')}@tarrow.example`, role: 'planner' });
    expect(r.status).toBe(429);
    expect(r.body).toEqual({ error: { code: 'RATE_LIMITED', message: 'Too many invitations in a short time; wait a few minutes' } });
    expect((await stack.pool.query('select count(*)::int as n from invitations')).rows[0].n).toBe(before);
  });

  it('password-reset requests: 5 per e-mail, then 20 per address over all e-mails', async () => {
    const anon = createClient(stack.baseUrl);
    const email = `${unique('nobody')}@tarrow.example`;
    for (let i = 0; i < 5; i++) expect((await anon.post('/api/password-reset/request', { email })).status).toBe(200);
    const sixth = await anon.post('/api/password-reset/request', { email });
    expect(sixth.status).toBe(429);
    expect(sixth.body.error).toEqual({ code: 'RATE_LIMITED', message: 'Too many password-reset requests; wait a few minutes' });
    // 6 requests so far from this address; other e-mails go through up to the address limit
    for (let n = 7; n <= PASSWORD_RESET_ADDRESS_LIMIT; n++) {
      expect((await anon.post('/api/password-reset/request', { email: `${unique('other')}@tarrow.example` })).status, `request ${n}`).toBe(200);
    }
    const over = await anon.post('/api/password-reset/request', { email: `${unique('fresh')}@tarrow.example` });
    expect(over.status).toBe(429);
    expect(over.body.error.message).toBe('Too many password-reset requests from this address; wait a few minutes');
    const audited = await stack.pool.query(`select count(*)::int as n from audit_log where action = 'password-reset.request'`);
    expect(audited.rows[0].n).toBe(PASSWORD_RESET_ADDRESS_LIMIT - 1); // the 6th and the 21st did nothing
  });

  it('link tokens: the 61st look-up within 15 minutes gets 429', async () => {
    const anon = createClient(stack.baseUrl);
    for (let i = 0; i < 60; i++) {
      const r = await anon.get(`/api/invitations/token/${'b'.repeat(43)}`);
      expect(r.status, `look-up ${i + 1}`).toBe(400);
    }
    const r = await anon.get(`/api/invitations/token/${'b'.repeat(43)}`);
    expect(r.status).toBe(429);
    expect(r.body.error.message).toBe('Too many attempts with links; wait a few minutes');
  });

  it('sign-in: a forged X-Forwarded-For does not reset the per-e-mail limit when no proxy is trusted', async () => {
    const c = createClient(stack.baseUrl);
    await c.fetchCsrf();
    for (let i = 0; i < 10; i++) {
      const r = await c.post('/api/auth/sign-in', { email: ROLE_EMAIL.engineer, password: `wrong-${i}` }, { headers: { 'X-Forwarded-For': `198.51.100.${i + 1}` } });
      expect(r.status).toBe(401);
    }
    const r = await c.post('/api/auth/sign-in', { email: ROLE_EMAIL.engineer, password: DEMO_PASSWORD }, { headers: { 'X-Forwarded-For': '198.51.100.99' } });
    expect(r.status).toBe(429);
    const ips = await stack.pool.query(`select distinct ip from audit_log where action = 'auth.sign-in-failed' and details->>'email' = $1`, [ROLE_EMAIL.engineer]);
    expect(ips.rows.map((x) => x.ip)).toEqual([expect.stringMatching(/127\.0\.0\.1$/)]);
  });

  it(`sign-in: ${SIGN_IN_ADDRESS_LIMIT} failures from one address over many e-mails, then 429 even for a right password`, async () => {
    const c = createClient(stack.baseUrl);
    // The test above made 11 failed attempts from this address (10 wrong passwords, one 429).
    await c.fetchCsrf();
    const attempts = Array.from({ length: SIGN_IN_ADDRESS_LIMIT - 11 }, () => `${unique('spray')}@tarrow.example`);
    // a few at a time: each unknown e-mail still costs a full scrypt check on the server
    for (let i = 0; i < attempts.length; i += 5) {
      const batch = await Promise.all(attempts.slice(i, i + 5).map((email) => c.post('/api/auth/sign-in', { email, password: 'Summer2026!' })));
      expect(batch.map((r) => r.status)).toEqual(batch.map(() => 401));
    }
    const r = await c.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
    expect(r.status).toBe(429);
    expect(r.body.error).toEqual({ code: 'RATE_LIMITED', message: 'Too many failed sign-ins from this address; wait a few minutes and try again' });
  });
});

// ---------------------------------------------------------------- behind a TLS proxy

describe('behind a TLS-terminating proxy (COOKIE_SECURE=1)', () => {
  const original = { COOKIE_SECURE: undefined as string | undefined };
  beforeAll(async () => {
    original.COOKIE_SECURE = stack.env.COOKIE_SECURE;
    stack.env.COOKIE_SECURE = '1';
    await stack.restartServer(); // fresh rate-limit counters as well
  });
  afterAll(async () => {
    if (original.COOKIE_SECURE === undefined) delete stack.env.COOKIE_SECURE;
    else stack.env.COOKIE_SECURE = original.COOKIE_SECURE;
  });

  const https = { 'X-Forwarded-Proto': 'https' };
  const sessionCookie = (res: Response) => res.headers.getSetCookie().find((c) => c.startsWith('keel.sid='));

  it('sets the session cookie Secure, HttpOnly and SameSite=Lax, and sends HSTS and upgrade-insecure-requests', async () => {
    const res = await fetch(`${stack.baseUrl}/api/auth/csrf`, { headers: https });
    expect(res.status).toBe(200);
    const cookie = sessionCookie(res);
    expect(cookie).toBeDefined();
    const attrs = cookie!.split(';').map((a) => a.trim().toLowerCase());
    expect(attrs).toContain('secure');
    expect(attrs).toContain('httponly');
    expect(attrs).toContain('samesite=lax');
    expect(attrs).toContain('path=/');
    expect(res.headers.get('strict-transport-security')).toMatch(/max-age=\d+/);
    expect(res.headers.get('content-security-policy')).toContain('upgrade-insecure-requests');
  });

  it('never sends the session cookie over plain http', async () => {
    const res = await fetch(`${stack.baseUrl}/api/auth/csrf`);
    expect(res.status).toBe(200);
    expect(sessionCookie(res)).toBeUndefined();
  });

  it('signs in over forwarded https, keeps the session, and audits the address the proxy gives', async () => {
    const jar: string[] = [];
    const call = async (method: string, p: string, body?: unknown, token?: string) => {
      const res = await fetch(`${stack.baseUrl}${p}`, {
        method,
        headers: {
          ...https,
          'X-Forwarded-For': '203.0.113.40',
          'Content-Type': 'application/json',
          ...(jar.length ? { Cookie: jar.join('; ') } : {}),
          ...(token ? { 'x-csrf-token': token } : {}),
        },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const c = sessionCookie(res);
      if (c) jar.splice(0, jar.length, c.split(';')[0]);
      return { status: res.status, body: await res.json(), cookie: c };
    };
    const csrf = await call('GET', '/api/auth/csrf');
    const signIn = await call('POST', '/api/auth/sign-in', { email: ROLE_EMAIL.operator, password: DEMO_PASSWORD }, csrf.body.csrfToken);
    expect(signIn.status).toBe(200);
    expect(signIn.cookie).toMatch(/;\s*Secure/i);
    expect((await call('GET', '/api/auth/me')).body.person.email).toBe(ROLE_EMAIL.operator);
    const audit = await stack.pool.query(`select ip from audit_log where action = 'auth.sign-in' order by id desc limit 1`);
    expect(audit.rows[0].ip).toBe('203.0.113.40');
  });
});

// ---------------------------------------------------------------- configuration

describe('configuration', () => {
  it('the server refuses to start in production with the development session secret', async () => {
    const env: NodeJS.ProcessEnv = { ...process.env, ...stack.env, NODE_ENV: 'production', PORT: '0' };
    delete env.SESSION_SECRET;
    const child = spawn(path.join(repoRoot, 'node_modules', '.bin', 'tsx'), ['server/main.ts'], { cwd: repoRoot, env, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (out += d.toString()));
    const code = await waitFor(
      async () => (child.exitCode !== null ? { code: child.exitCode } : null),
      'the server to exit',
      60_000,
    ).catch((e: Error) => {
      child.kill('SIGKILL');
      throw e;
    });
    expect(code).toEqual({ code: 1 });
    expect(out).toContain('SESSION_SECRET: NODE_ENV is production but SESSION_SECRET is the development default');
    expect(out).not.toContain('listening on');
  });
});
