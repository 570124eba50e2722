import { describe, expect, it } from 'vitest';
import { createSendEmailProcessor } from './send-email';

const good = { kind: 'invitation', to: 'new.person@tarrow.example', subject: 'Your invitation to Keel', text: 'Hello', html: '<p>Hello</p>' };

function fakeTransport(result: () => Promise<unknown>) {
  const sent: unknown[] = [];
  return {
    sent,
    transport: {
      sendMail: async (m: unknown) => {
        sent.push(m);
        return result();
      },
    } as never,
  };
}

describe('send-email processor', () => {
  it('sends the message fields from the configured sender', async () => {
    const t = fakeTransport(async () => ({ messageId: '<1@keel>', accepted: ['new.person@tarrow.example'] }));
    const run = createSendEmailProcessor({ transport: t.transport, from: 'Keel <keel@tarrow.example>' });
    expect(await run({ id: '1', data: good })).toEqual({ messageId: '<1@keel>', accepted: ['new.person@tarrow.example'] });
    expect(t.sent).toEqual([{ from: 'Keel <keel@tarrow.example>', to: good.to, subject: good.subject, text: good.text, html: good.html }]);
  });

  it('fails for good (UnrecoverableError) on a bad payload, naming the fields, without sending', async () => {
    const t = fakeTransport(async () => ({}));
    const run = createSendEmailProcessor({ transport: t.transport, from: 'k@x.example' });
    const err = await run({ id: '7', data: { ...good, to: 'nobody', subject: '', password: 'secret' } }).catch((e: Error) => e);
    expect(err).toBeInstanceOf(Error);
    expect((err as Error).name).toBe('UnrecoverableError');
    expect((err as Error).message).toMatch(/^Bad e-mail job 7: /);
    expect((err as Error).message).toContain('to: to must be an e-mail address');
    expect((err as Error).message).toContain('subject: subject is required');
    expect((err as Error).message).toContain('Unrecognized key: "password"');
    expect(t.sent).toEqual([]);
  });

  it('a permanent SMTP refusal (5xx) is unrecoverable; a temporary one (4xx) or a dead connection retries', async () => {
    const fail = (responseCode?: number) => async () => {
      throw Object.assign(new Error(responseCode ? `SMTP ${responseCode}` : 'connect ECONNREFUSED'), responseCode ? { responseCode } : { code: 'ECONNREFUSED' });
    };
    const permanent = await createSendEmailProcessor({ transport: fakeTransport(fail(550)).transport, from: 'k@x.example' })({ id: '1', data: good }).catch((e: Error) => e);
    expect((permanent as Error).name).toBe('UnrecoverableError');
    const temporary = await createSendEmailProcessor({ transport: fakeTransport(fail(451)).transport, from: 'k@x.example' })({ id: '1', data: good }).catch((e: Error) => e);
    expect((temporary as Error).name).not.toBe('UnrecoverableError');
    const refused = await createSendEmailProcessor({ transport: fakeTransport(fail()).transport, from: 'k@x.example' })({ id: '1', data: good }).catch((e: Error) => e);
    expect((refused as Error).name).not.toBe('UnrecoverableError');
    expect((refused as Error).message).toBe('connect ECONNREFUSED');
  });
});
