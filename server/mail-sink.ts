// The local fake SMTP server (development, tests, demo): accepts every message on loopback,
// parses it with mailparser and stores it in outbox_messages, which the Outbox screen lists.
// A message is acknowledged only after it is stored; if PostgreSQL is away the sender gets a
// temporary 451 and retries (nodemailer via the BullMQ job's backoff).
import type { AddressObject } from 'mailparser';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { Db } from '../db/client';
import { insertOutboxMessage } from '../db/queries/outbox';
import type { Logger } from './deps';

export const MAIL_SINK_MAX_BYTES = 10 * 1024 * 1024;

export interface MailSink {
  listen(port: number, host: string): Promise<number>;
  close(): Promise<void>;
}

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}

export function createMailSink(opts: { db: Db; log: Logger }): MailSink {
  const server = new SMTPServer({
    name: 'keel-mail-sink',
    banner: 'Keel development mail sink: messages are stored, never delivered',
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAIL_SINK_MAX_BYTES,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (mail) => {
          if (stream.sizeExceeded) {
            const err = Object.assign(new Error('Message too large'), { responseCode: 552 });
            return callback(err);
          }
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(', ');
          const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
          const row = await insertOutboxMessage(opts.db, {
            messageId: mail.messageId ?? null,
            from: addressText(mail.from) || envelopeFrom,
            to: addressText(mail.to) || envelopeTo,
            subject: mail.subject ?? '',
            text: mail.text ?? null,
            html: typeof mail.html === 'string' ? mail.html : null,
          });
          opts.log.info(`stored message ${row.id} to ${row.to}: ${row.subject}`);
          callback();
        })
        .catch((err: Error) => {
          opts.log.warn(`could not store a message: ${err.message}`);
          callback(Object.assign(new Error('Temporary failure storing the message; try again'), { responseCode: 451 }));
        });
    },
  });
  server.on('error', (err) => opts.log.warn(`smtp: ${err.message}`));
  return {
    listen: (port, host) =>
      new Promise((resolve, reject) => {
        server.server.once('error', reject);
        server.listen(port, host, () => {
          const addr = server.server.address();
          resolve(typeof addr === 'object' && addr ? addr.port : port);
        });
      }),
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
