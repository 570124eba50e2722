// Queueing e-mail from a request: a Redis outage becomes a 503 (and, inside a transaction, rolls
// back what the request wrote) rather than a 500 or a hang.
import type { EmailJob } from '../../jobs/queues';
import type { Deps } from '../deps';
import { UnavailableError } from '../errors';

const QUEUE_TIMEOUT_MS = 5000;

export async function queueOrUnavailable(deps: Deps, message: EmailJob): Promise<void> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  try {
    await Promise.race([
      deps.mailer.send(message),
      new Promise((_, reject) => {
        timer = setTimeout(() => reject(new Error('timed out')), QUEUE_TIMEOUT_MS);
      }),
    ]);
  } catch (err) {
    deps.log.error(`could not queue the ${message.kind} e-mail`, err);
    throw new UnavailableError('The e-mail could not be queued (the job queue is unavailable); nothing was saved, try again shortly');
  } finally {
    clearTimeout(timer);
  }
}
