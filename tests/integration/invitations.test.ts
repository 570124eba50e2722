// The e-mailed account flows end to end through the real processes: the API queues the message,
// the worker sends it over SMTP, the local mail sink stores it in outbox_messages, the link's
// token does the rest.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

let stack: Stack;
let admin: Client;
beforeAll(async () => {
  stack = await startStack({ worker: true, mailSink: true });
  admin = createClient(stack.baseUrl);
  expect((await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD)).status).toBe(200);
});
afterAll(async () => {
  await stack?.stop();
});

/** The newest message to `to` in the Outbox, as the admin's Outbox screen would show it. */
async function mailTo(to: string, subject: string): Promise<{ id: number; text: string; html: string | null }> {
  const summary = await waitFor(async () => {
    const r = await admin.get(`/api/outbox?to=${encodeURIComponent(to)}`);
    expect(r.status).toBe(200);
    return (r.body.messages as { id: number; subject: string }[]).find((m) => m.subject === subject);
  }, `an e-mail to ${to}`);
  const one = await admin.get(`/api/outbox/${summary.id}`);
  expect(one.status).toBe(200);
  return one.body.message;
}

function tokenFrom(text: string, route: string): string {
  const m = text.match(new RegExp(`${stack.baseUrl.replace(/[.:/]/g, '\\$&')}/${route}\\?token=([A-Za-z0-9_-]+)`));
  expect(m, `a ${route} link in:\n${text}`).not.toBeNull();
  return m![1];
}

describe('invitation', () => {
  it('admin invites → e-mail in the Outbox → accept with the link → the new person signs in with the role', async () => {
    const email = 'new.planner@tarrow.example';
    const invited = await admin.post('/api/invitations', { email: 'New.Planner@Tarrow.example ', role: 'planner' });
    expect(invited.status).toBe(201);
    expect(invited.body.invitation).toMatchObject({ email, role: 'planner', status: 'pending', usedAt: null });

    const mail = await mailTo(email, 'Your invitation to Keel');
    expect(mail.text).toContain('Demo Administrator invited you to Keel as Planner');
    const token = tokenFrom(mail.text, 'accept-invite');
    // The database keeps only a hash of the token.
    const stored = await stack.pool.query(`select token_hash from invitations where email = $1`, [email]);
    expect(stored.rows[0].token_hash).not.toContain(token);
    expect(stored.rows[0].token_hash).toMatch(/^[0-9a-f]{64}$/);

    const anonymous = createClient(stack.baseUrl);
    const lookup = await anonymous.get(`/api/invitations/token/${token}`);
    expect(lookup.status).toBe(200);
    expect(lookup.body).toMatchObject({ email, role: 'planner' });

    const accepted = await anonymous.post('/api/invitations/accept', { token, displayName: 'Wren Planner', password: 'a-new-long-password' });
    expect(accepted.status).toBe(201);
    expect(accepted.body.person).toMatchObject({ email, displayName: 'Wren Planner', role: 'planner', disabled: false });

    const signedIn = await createClient(stack.baseUrl).signIn(email, 'a-new-long-password');
    expect(signedIn.status).toBe(200);
    expect(signedIn.body.person.role).toBe('planner');
    expect(signedIn.body.permissions).toEqual(['view', 'runStudy']);

    // The link works once.
    const before = await rowCounts(stack.pool);
    const again = await anonymous.post('/api/invitations/accept', { token, displayName: 'Someone Else', password: 'another-long-password' });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('INVALID_TOKEN');
    expect((await anonymous.get(`/api/invitations/token/${token}`)).body.error.code).toBe('INVALID_TOKEN');
    expect(await rowCounts(stack.pool)).toEqual(before);

    const list = await admin.get('/api/invitations');
    expect(list.body.invitations.find((i: { email: string }) => i.email === email).status).toBe('used');
    const audit = await stack.pool.query(`select action from audit_log where action like 'invitation.%' order by id`);
    expect(audit.rows.map((r) => r.action)).toEqual(['invitation.create', 'invitation.accept']);
  });

  it('refuses to invite an address that already has an account', async () => {
    const r = await admin.post('/api/invitations', { email: ROLE_EMAIL.operator, role: 'engineer' });
    expect(r.status).toBe(409);
    expect(r.body.error.details).toEqual([{ path: 'email', message: 'Already has an account' }]);
  });

  it('a newer invitation for the same address voids the older link; a revoked or expired one is refused', async () => {
    const email = 'twice.invited@tarrow.example';
    expect((await admin.post('/api/invitations', { email, role: 'operator' })).status).toBe(201);
    const first = tokenFrom((await mailTo(email, 'Your invitation to Keel')).text, 'accept-invite');
    const second = await admin.post('/api/invitations', { email, role: 'engineer' });
    expect(second.status).toBe(201);
    const anonymous = createClient(stack.baseUrl);
    expect((await anonymous.get(`/api/invitations/token/${first}`)).body.error.code).toBe('INVALID_TOKEN');

    const revoked = await admin.del(`/api/invitations/${second.body.invitation.id}`);
    expect(revoked.status).toBe(200);
    expect(revoked.body.invitation.status).toBe('revoked');
    const messages = await waitFor(async () => {
      const r = await admin.get(`/api/outbox?to=${encodeURIComponent(email)}`);
      return r.body.messages.length === 2 ? r.body.messages : null;
    }, 'both invitation e-mails');
    const newest = await admin.get(`/api/outbox/${messages[0].id}`);
    const secondToken = tokenFrom(newest.body.message.text, 'accept-invite');
    expect(secondToken).not.toBe(first);
    const r = await anonymous.post('/api/invitations/accept', { token: secondToken, displayName: 'Too Late', password: 'a-long-password-1' });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('INVALID_TOKEN');

    // Expired: move the clock of a fresh invitation into the past.
    expect((await admin.post('/api/invitations', { email, role: 'operator' })).status).toBe(201);
    await stack.pool.query(`update invitations set expires_at = now() - interval '1 minute' where email = $1 and used_at is null and revoked_at is null`, [email]);
    const expiredToken = await waitFor(async () => {
      const list = await admin.get(`/api/outbox?to=${encodeURIComponent(email)}`);
      if (list.body.messages.length < 3) return null;
      return tokenFrom((await admin.get(`/api/outbox/${list.body.messages[0].id}`)).body.message.text, 'accept-invite');
    }, 'the third invitation e-mail');
    const expired = await anonymous.post('/api/invitations/accept', { token: expiredToken, displayName: 'Too Late', password: 'a-long-password-1' });
    expect(expired.status).toBe(400);
    expect(expired.body.error.code).toBe('INVALID_TOKEN');
    const nobody = await stack.pool.query(`select count(*)::int as n from people where email = $1`, [email]);
    expect(nobody.rows[0].n).toBe(0);
  });
});

describe('password reset', () => {
  it('request → e-mail → new password; the old password and the old sessions stop working', async () => {
    const email = ROLE_EMAIL.engineer;
    const oldSession = createClient(stack.baseUrl);
    expect((await oldSession.signIn(email, DEMO_PASSWORD)).status).toBe(200);

    const anonymous = createClient(stack.baseUrl);
    const asked = await anonymous.post('/api/password-reset/request', { email: email.toUpperCase() });
    expect(asked.status).toBe(200);
    const unknown = await anonymous.post('/api/password-reset/request', { email: 'no-such-person@tarrow.example' });
    expect(unknown.status).toBe(200);
    expect(unknown.body).toEqual(asked.body); // no account enumeration

    const mail = await mailTo(email, 'Reset your Keel password');
    const token = tokenFrom(mail.text, 'reset-password');
    const done = await anonymous.post('/api/password-reset/complete', { token, password: 'a-fresh-password-42' });
    expect(done.status).toBe(200);

    expect((await oldSession.get('/api/auth/me')).status).toBe(401);
    expect((await createClient(stack.baseUrl).signIn(email, DEMO_PASSWORD)).status).toBe(401);
    expect((await createClient(stack.baseUrl).signIn(email, 'a-fresh-password-42')).status).toBe(200);

    const reuse = await anonymous.post('/api/password-reset/complete', { token, password: 'yet-another-password' });
    expect(reuse.status).toBe(400);
    expect(reuse.body.error.code).toBe('INVALID_TOKEN');

    // Nothing was sent to the unknown address.
    const none = await admin.get(`/api/outbox?to=${encodeURIComponent('no-such-person@tarrow.example')}`);
    expect(none.body.messages).toEqual([]);
    const audit = await stack.pool.query(`select action, details->>'sent' as sent from audit_log where action like 'password-reset.%' order by id`);
    expect(audit.rows).toEqual([
      { action: 'password-reset.request', sent: 'true' },
      { action: 'password-reset.request', sent: 'false' },
      { action: 'password-reset.complete', sent: null },
    ]);
  });
});
