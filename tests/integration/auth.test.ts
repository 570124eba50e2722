// Sign-in, sessions, CSRF, rate limiting and disabling people, through the real server.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClient } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

let stack: Stack;
beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
});
afterAll(async () => {
  await stack?.stop();
});

const sid = (cookie: string | undefined) => decodeURIComponent(cookie ?? '').replace(/^s:/, '').split('.')[0];

describe('sign-in', () => {
  it('a wrong password and an unknown e-mail get the same 401, naming neither part', async () => {
    const c = createClient(stack.baseUrl);
    const wrongPassword = await c.signIn(ROLE_EMAIL.engineer, 'not-the-password');
    const unknownEmail = await c.signIn('nobody-here@tarrow.example', DEMO_PASSWORD);
    expect(wrongPassword.status).toBe(401);
    expect(unknownEmail.status).toBe(401);
    expect(wrongPassword.body).toEqual(unknownEmail.body);
    expect(wrongPassword.body.error.code).toBe('INVALID_CREDENTIALS');
    expect(wrongPassword.body.error.message).not.toMatch(/unknown|no account|not found|incorrect password|wrong password/i);
    const me = await c.get('/api/auth/me');
    expect(me.status).toBe(401);
  });

  it('failed and successful sign-ins are in the audit log', async () => {
    const c = createClient(stack.baseUrl);
    await c.signIn(ROLE_EMAIL.operator, 'not-the-password');
    await c.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
    const r = await stack.pool.query(
      `select action, details->>'reason' as reason from audit_log a join people p on p.id = a.person_id
        where p.email = $1 and action like 'auth.sign-in%' order by a.id`,
      [ROLE_EMAIL.operator],
    );
    expect(r.rows).toEqual([
      { action: 'auth.sign-in-failed', reason: 'wrong-password' },
      { action: 'auth.sign-in', reason: null },
    ]);
  });

  it('rotates the session id at sign-in and returns a new CSRF token', async () => {
    const c = createClient(stack.baseUrl);
    const before = await c.fetchCsrf();
    const anonymousSid = sid(c.cookie('keel.sid'));
    expect(anonymousSid).not.toBe('');
    const r = await c.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
    expect(r.status).toBe(200);
    expect(r.body.person.email).toBe(ROLE_EMAIL.engineer);
    expect(r.body.permissions).toEqual(['view', 'acknowledgeAlert', 'runAnalysis', 'editNetwork', 'runStudy']);
    expect(sid(c.cookie('keel.sid'))).not.toBe(anonymousSid);
    expect(r.body.csrfToken).not.toBe(before);
    // The anonymous session is gone from the store.
    const old = await stack.pool.query(`select count(*)::int as n from session where sid = $1`, [anonymousSid]);
    expect(old.rows[0].n).toBe(0);
  });

  it('sets the session cookie HttpOnly and SameSite=Lax (not Secure without COOKIE_SECURE)', async () => {
    const res = await fetch(`${stack.baseUrl}/api/auth/csrf`);
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith('keel.sid='));
    expect(cookie).toBeDefined();
    expect(cookie).toMatch(/;\s*HttpOnly/i);
    expect(cookie).toMatch(/;\s*SameSite=Lax/i);
    expect(cookie).not.toMatch(/;\s*Secure/i);
  });

  it('signing out ends the session', async () => {
    const c = createClient(stack.baseUrl);
    await c.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
    const cookieHeader = c.cookieHeader();
    expect((await c.get('/api/auth/me')).status).toBe(200);
    const out = await c.signOut();
    expect(out.status).toBe(200);
    expect((await c.get('/api/auth/me')).status).toBe(401);
    // Replaying the old cookie does not bring the session back.
    const replay = await fetch(`${stack.baseUrl}/api/auth/me`, { headers: { Cookie: cookieHeader } });
    expect(replay.status).toBe(401);
  });
});

describe('CSRF', () => {
  it('refuses a state-changing request without the token, and writes nothing', async () => {
    const c = createClient(stack.baseUrl);
    await c.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD);
    const before = await rowCounts(stack.pool);
    const missing = await c.post('/api/network/areas', { code: 'no-token', name: 'No token' }, { csrf: false });
    expect(missing.status).toBe(403);
    expect(missing.body.error.code).toBe('CSRF');
    const wrong = await c.post('/api/network/areas', { code: 'wrong-token', name: 'Wrong token' }, { csrf: 'x'.repeat(43) });
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.code).toBe('CSRF');
    const del = await c.del('/api/network/areas/1', { csrf: false });
    expect(del.status).toBe(403);
    expect(await rowCounts(stack.pool)).toEqual(before);
    // The same request with the token goes through.
    const ok = await c.post('/api/network/areas', { code: 'with-token', name: 'With token' });
    expect(ok.status).toBe(201);
  });

  it('sign-in itself needs the token', async () => {
    const c = createClient(stack.baseUrl);
    const r = await c.post('/api/auth/sign-in', { email: ROLE_EMAIL.admin, password: DEMO_PASSWORD }, { csrf: false });
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('CSRF');
  });

  it("another session's token is refused", async () => {
    const a = createClient(stack.baseUrl);
    const b = createClient(stack.baseUrl);
    await a.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
    const tokenOfB = await b.fetchCsrf();
    const r = await a.post('/api/network/areas', { code: 'cross', name: 'Cross' }, { csrf: tokenOfB });
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('CSRF');
  });
});

describe('sessions', () => {
  it('survive a server restart (they live in PostgreSQL)', async () => {
    const c = createClient(stack.baseUrl);
    await c.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
    const before = await c.get('/api/auth/me');
    expect(before.status).toBe(200);
    await stack.restartServer();
    const after = await c.get('/api/auth/me');
    expect(after.status).toBe(200);
    expect(after.body.person.email).toBe(ROLE_EMAIL.planner);
    expect(after.body.csrfToken).toBe(before.body.csrfToken);
    // and the CSRF token still works for writes (planner may run studies but not edit: 403 FORBIDDEN, not CSRF)
    const write = await c.post('/api/network/areas', { code: 'after-restart', name: 'After restart' });
    expect(write.body.error.code).toBe('FORBIDDEN');
  });
});

describe('disabling a person', () => {
  it("ends their sessions at once, refuses their sign-in, and enabling lets them back", async () => {
    const admin = createClient(stack.baseUrl);
    await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD);
    const op = createClient(stack.baseUrl);
    await op.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
    expect((await op.get('/api/auth/me')).status).toBe(200);
    const id = (await stack.pool.query(`select id from people where email = $1`, [ROLE_EMAIL.operator])).rows[0].id as number;

    const off = await admin.patch(`/api/people/${id}`, { disabled: true });
    expect(off.status).toBe(200);
    expect(off.body.person.disabled).toBe(true);
    const left = await stack.pool.query(`select count(*)::int as n from session where sess::jsonb -> 'passport' ->> 'user' = $1`, [String(id)]);
    expect(left.rows[0].n).toBe(0);
    expect((await op.get('/api/auth/me')).status).toBe(401);

    const again = await createClient(stack.baseUrl).signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
    expect(again.status).toBe(403);
    expect(again.body.error.code).toBe('ACCOUNT_DISABLED');
    // A wrong password for a disabled account still reads like any wrong password.
    const wrong = await createClient(stack.baseUrl).signIn(ROLE_EMAIL.operator, 'not-the-password');
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.code).toBe('INVALID_CREDENTIALS');

    const audit = await stack.pool.query(`select action, details from audit_log where target = $1 and action = 'person.disable'`, [`person:${id}`]);
    expect(audit.rows).toHaveLength(1);
    expect(audit.rows[0].details.sessionsEnded).toBeGreaterThanOrEqual(1);

    expect((await admin.patch(`/api/people/${id}`, { disabled: false })).status).toBe(200);
    expect((await createClient(stack.baseUrl).signIn(ROLE_EMAIL.operator, DEMO_PASSWORD)).status).toBe(200);
  });

  it('keeps at least one active administrator and refuses disabling yourself', async () => {
    const admin = createClient(stack.baseUrl);
    await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD);
    const id = (await stack.pool.query(`select id from people where email = $1`, [ROLE_EMAIL.admin])).rows[0].id as number;
    const demote = await admin.patch(`/api/people/${id}`, { role: 'engineer' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.message).toBe('Keel needs at least one active administrator');
    const self = await admin.patch(`/api/people/${id}`, { disabled: true });
    expect(self.status).toBe(409);
    expect(self.body.error.message).toBe('You cannot disable your own account');
    const still = await stack.pool.query(`select role, disabled from people where id = $1`, [id]);
    expect(still.rows[0]).toEqual({ role: 'admin', disabled: false });
  });

  it('a role change applies to the open session at once', async () => {
    const admin = createClient(stack.baseUrl);
    await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD);
    const eng = createClient(stack.baseUrl);
    await eng.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
    const id = (await stack.pool.query(`select id from people where email = $1`, [ROLE_EMAIL.engineer])).rows[0].id as number;
    expect((await eng.post('/api/network/areas', { code: 'before-demotion', name: 'Before' })).status).toBe(201);
    expect((await admin.patch(`/api/people/${id}`, { role: 'planner' })).status).toBe(200);
    const after = await eng.post('/api/network/areas', { code: 'after-demotion', name: 'After' });
    expect(after.status).toBe(403);
    expect(after.body.error.code).toBe('FORBIDDEN');
    const audit = await stack.pool.query(`select details from audit_log where target = $1 and action = 'person.role'`, [`person:${id}`]);
    expect(audit.rows.map((r) => r.details)).toEqual([{ from: 'engineer', to: 'planner' }]);
    expect((await admin.patch(`/api/people/${id}`, { role: 'engineer' })).status).toBe(200);
  });
});

describe('rate limit', () => {
  it('the 11th sign-in attempt within a minute gets 429 with the error body, even with the right password and after a server restart', async () => {
    const c = createClient(stack.baseUrl);
    for (let i = 0; i < 10; i++) {
      const r = await c.signIn(ROLE_EMAIL.planner, `wrong-${i}`);
      expect(r.status, `attempt ${i + 1}`).toBe(401);
    }
    // The counts are in Redis, shared by every server process: a restarted (or another) server
    // process goes on counting.
    await stack.restartServer();
    const eleventh = await c.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
    expect(eleventh.status).toBe(429);
    expect(eleventh.body).toEqual({ error: { code: 'RATE_LIMITED', message: 'Too many sign-in attempts; wait a minute and try again' } });
    // The limit is per address and e-mail: another account from the same address still signs in.
    expect((await createClient(stack.baseUrl).signIn(ROLE_EMAIL.operator, DEMO_PASSWORD)).status).toBe(200);
  });
});

describe('the HTTP surface', () => {
  it('sends security headers with a CSP fit for the web export', async () => {
    const res = await fetch(`${stack.baseUrl}/api/health`);
    const csp = res.headers.get('content-security-policy') ?? '';
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toMatch(/style-src 'self' 'unsafe-inline'/);
    expect(csp).toContain("frame-ancestors 'none'");
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(res.headers.get('x-powered-by')).toBeNull();
  });

  it('answers unknown API paths with a JSON 404 and malformed JSON with a 400', async () => {
    const c = createClient(stack.baseUrl);
    const r = await c.get('/api/no-such-thing');
    expect(r.status).toBe(404);
    expect(r.body).toEqual({ error: { code: 'NOT_FOUND', message: 'No API route GET /api/no-such-thing' } });
    const bad = await c.post('/api/auth/sign-in', undefined, { rawBody: '{"email": ' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('VALIDATION');
  });
});
