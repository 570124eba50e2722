// `tsx jobs/worker.ts`: the BullMQ worker process. Runs the queues' processors, writes a heartbeat
// key in Redis (TTL 15 s) so /api/health can tell a worker is alive, and closes gracefully on
// SIGTERM / SIGINT: in-flight jobs finish, then connections close.
import os from 'node:os';
import { Worker, type Job } from 'bullmq';
import { Redis } from 'ioredis';
import { loadConfig, type Config } from '../server/config';
import { consoleLogger, type Logger } from '../server/deps';
import { createIngestWorker } from './processors/ingest';
import { createSendEmailProcessor, createSmtpTransport } from './processors/send-email';
import { startAnalysisWorkers } from './processors/analysis-workers';
import { HEARTBEAT_INTERVAL_MS, HEARTBEAT_TTL_SECONDS, heartbeatKey, QUEUE_NAMES } from './queues';

export interface RunningWorker {
  id: string;
  workers: Worker[];
  close(): Promise<void>;
}

export async function startWorker(config: Config, log: Logger = consoleLogger('worker')): Promise<RunningWorker> {
  // BullMQ's blocking connection must retry forever (maxRetriesPerRequest: null).
  const connection = new Redis(config.redisUrl, { maxRetriesPerRequest: null });
  connection.on('error', (e: Error) => log.warn(`redis: ${e.message}`));
  const transport = createSmtpTransport({ host: config.smtpHost, port: config.smtpPort });
  const common = { connection, prefix: config.queuePrefix };

  const workers: Worker[] = [
    new Worker(QUEUE_NAMES.email, createSendEmailProcessor({ transport, from: config.mailFrom }), { ...common, concurrency: 4 }),
    createIngestWorker({ ...common, log }),
    // scan and fit (sandboxed), alert evaluation and notification: jobs/processors/analysis-workers.ts
    ...startAnalysisWorkers({ ...common, log, listen: false }).workers,
  ];
  for (const w of workers) {
    w.on('failed', (job: Job | undefined, err: Error) => {
      const final = !job || err.name === 'UnrecoverableError' || job.attemptsMade >= (job.opts.attempts ?? 1);
      log.warn(`${w.name} job ${job?.id ?? '?'} ${final ? 'failed for good' : `will retry (attempt ${job.attemptsMade})`}: ${err.message}`);
    });
    w.on('error', (err: Error) => log.warn(`${w.name} worker: ${err.message}`));
    w.on('completed', (job: Job) => log.info(`${w.name} job ${job.id} done`));
  }
  await Promise.all(workers.map((w) => w.waitUntilReady()));

  const id = `${os.hostname()}:${process.pid}`;
  const key = heartbeatKey(config.queuePrefix, id);
  const beat = () =>
    connection
      .set(key, JSON.stringify({ at: new Date().toISOString(), queues: workers.map((w) => w.name) }), 'EX', HEARTBEAT_TTL_SECONDS)
      .catch((e: Error) => log.warn(`heartbeat: ${e.message}`));
  await beat();
  const timer = setInterval(() => void beat(), HEARTBEAT_INTERVAL_MS);
  log.info(`worker ${id} running queues ${workers.map((w) => w.name).join(', ')} (prefix ${config.queuePrefix})`);

  return {
    id,
    workers,
    async close() {
      clearInterval(timer);
      await Promise.all(workers.map((w) => w.close().catch((e: Error) => log.warn(`closing ${w.name}: ${e.message}`))));
      await connection.del(key).catch(() => undefined);
      transport.close();
      await connection.quit().catch(() => connection.disconnect());
    },
  };
}

if (require.main === module) {
  const log = consoleLogger('worker');
  let running: RunningWorker | null = null;
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${signal}: finishing current jobs, then closing`);
    const force = setTimeout(() => {
      log.warn('did not close within 30 s; exiting');
      process.exit(1);
    }, 30_000);
    await running?.close();
    clearTimeout(force);
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
  startWorker(loadConfig(), log).then(
    (w) => {
      running = w;
      if (stopping) void w.close().then(() => process.exit(0));
    },
    (err: unknown) => {
      log.error('failed to start', err);
      process.exit(1);
    },
  );
}
