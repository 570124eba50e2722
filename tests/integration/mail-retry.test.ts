// E-mail jobs survive an SMTP outage: with no mail server listening, the worker's sends fail and
// BullMQ retries them with exponential backoff (1 s, 2 s, 4 s, …); once the sink is up the
// message arrives exactly once.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDb } from '../../db/client';
import { createMailSink, type MailSink } from '../../server/mail-sink';
import { createClient } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

let stack: Stack;
let sink: MailSink | null = null;
beforeAll(async () => {
  stack = await startStack({ worker: true, mailSink: false });
});
afterAll(async () => {
  await sink?.close();
  await stack?.stop();
});

describe('e-mail delivery', () => {
  it('retries while SMTP is down and delivers once it is back', async () => {
    const admin = createClient(stack.baseUrl);
    expect((await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD)).status).toBe(200);
    const r = await admin.post('/api/invitations', { email: 'patient.reader@tarrow.example', role: 'operator' });
    expect(r.status).toBe(201); // queued: the request does not wait for SMTP

    await waitFor(async () => stack.logs.some((l) => l.includes('[worker]') && l.includes('will retry')), 'a failed first attempt', 20_000);
    expect((await stack.pool.query(`select count(*)::int as n from outbox_messages`)).rows[0].n).toBe(0);

    const quiet = { info: () => undefined, warn: () => undefined, error: () => undefined };
    sink = createMailSink({ db: createDb(stack.pool), log: quiet });
    await sink.listen(stack.smtpPort, '127.0.0.1');
    const row = await waitFor(
      async () => (await stack.pool.query(`select "to", subject from outbox_messages`)).rows[0],
      'the retried message',
      30_000,
    );
    expect(row).toEqual({ to: 'patient.reader@tarrow.example', subject: 'Your invitation to Keel' });
    await new Promise((res) => setTimeout(res, 1500));
    expect((await stack.pool.query(`select count(*)::int as n from outbox_messages`)).rows[0].n).toBe(1);
  });
});
