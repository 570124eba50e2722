// Sends one e-mail job over SMTP (nodemailer). Bad payloads and permanent SMTP refusals (5xx) are
// UnrecoverableError; connection trouble and 4xx answers throw normally, so BullMQ retries with
// the queue's exponential backoff.
import { UnrecoverableError, type Job } from 'bullmq';
import nodemailer, { type Transporter } from 'nodemailer';
import { emailJobSchema } from '../queues';

export interface SmtpSettings {
  host: string;
  port: number;
}

export function createSmtpTransport(s: SmtpSettings): Transporter {
  // The development/test sink speaks plain SMTP on loopback; a real relay would add TLS and auth
  // from the environment (never from job payloads).
  return nodemailer.createTransport({
    host: s.host,
    port: s.port,
    secure: false,
    ignoreTLS: true,
    connectionTimeout: 5000,
    greetingTimeout: 5000,
    socketTimeout: 10_000,
  });
}

export interface SendEmailResult {
  messageId: string;
  accepted: string[];
}

export function createSendEmailProcessor(opts: { transport: Pick<Transporter, 'sendMail'>; from: string }) {
  return async function sendEmail(job: Pick<Job, 'data' | 'id'>): Promise<SendEmailResult> {
    const parsed = emailJobSchema.safeParse(job.data);
    if (!parsed.success) {
      const what = parsed.error.issues.map((i) => `${i.path.join('.') || '(payload)'}: ${i.message}`).join('; ');
      throw new UnrecoverableError(`Bad e-mail job ${job.id ?? ''}: ${what}`);
    }
    const m = parsed.data;
    try {
      const info = await opts.transport.sendMail({ from: opts.from, to: m.to, subject: m.subject, text: m.text, html: m.html });
      return { messageId: String(info.messageId), accepted: (info.accepted ?? []).map(String) };
    } catch (err) {
      const code = (err as { responseCode?: number }).responseCode;
      if (typeof code === 'number' && code >= 500) {
        throw new UnrecoverableError(`SMTP refused the message for good (${code}): ${(err as Error).message}`);
      }
      throw err;
    }
  };
}
