// The analysis workers of one worker process: scan and fit as SANDBOXED processors (BullMQ forks a
// child process per concurrent job from the file path, so estimator CPU never blocks this event
// loop: lock renewal and the other queues keep going), alert evaluation and notification in
// process. Registered by jobs/worker.ts; closed on its shutdown.
import path from 'node:path';
import { Worker, type ConnectionOptions, type Job } from 'bullmq';
import { consoleLogger, type Logger } from '../../server/deps';
import { createAnalysisContext, type AnalysisContext } from './analysis-context';
import { ANALYSIS_LOCK, ANALYSIS_QUEUES } from './analysis-queues';
import { autoScanEnabled, startAutoScan } from './auto-scan';
import { runEvaluateAlerts } from './evaluate-alerts';
import { runNotifyAlert } from './notify-alert';

export interface AnalysisWorkers {
  workers: Worker[];
  close(): Promise<void>;
}

export interface AnalysisWorkerOptions {
  connection: ConnectionOptions;
  prefix: string;
  log?: Logger;
  /** Concurrent scans / fits per worker process (each a child process; default 1 each). */
  scanConcurrency?: number;
  fitConcurrency?: number;
  /** Built from the environment when not given. */
  context?: AnalysisContext;
  /** Attach failure and error loggers (default true; false when the caller attaches its own). */
  listen?: boolean;
}

/** Sandboxed processor files, next to this one (.ts under tsx; .js if compiled). */
export function sandboxFile(name: 'scan' | 'fit'): string {
  const ext = path.extname(__filename) || '.ts';
  return path.join(__dirname, `${name}-sandbox${ext}`);
}

export function startAnalysisWorkers(opts: AnalysisWorkerOptions): AnalysisWorkers {
  const log = opts.log ?? consoleLogger('worker');
  const ctx = opts.context ?? createAnalysisContext(process.env, 'worker');
  const common = { connection: opts.connection, prefix: opts.prefix };
  const workers = [
    new Worker(ANALYSIS_QUEUES.scan, sandboxFile('scan'), { ...common, ...ANALYSIS_LOCK, concurrency: opts.scanConcurrency ?? 1 }),
    new Worker(ANALYSIS_QUEUES.fit, sandboxFile('fit'), { ...common, ...ANALYSIS_LOCK, concurrency: opts.fitConcurrency ?? 1 }),
    new Worker(ANALYSIS_QUEUES.evaluateAlerts, (job: Job) => runEvaluateAlerts(ctx, job), { ...common, concurrency: 1 }),
    new Worker(ANALYSIS_QUEUES.notifyAlert, (job: Job) => runNotifyAlert(ctx, job), { ...common, concurrency: 2 }),
  ];
  if (opts.listen !== false) {
    for (const w of workers) {
      w.on('failed', (job, err) => {
        const final = job && (err.name === 'UnrecoverableError' || job.attemptsMade >= (job.opts.attempts ?? 1));
        log.warn(`${w.name} job ${job?.id ?? '?'} ${final ? 'failed' : 'will retry'}: ${err.message}`);
      });
      w.on('error', (err) => log.warn(`${w.name} worker: ${err.message}`));
    }
  }
  // ingest → scan: queue default scans of new recordings (./auto-scan.ts)
  const stopAutoScan = autoScanEnabled() ? startAutoScan(ctx) : () => undefined;
  for (const w of workers) w.once('closing', () => stopAutoScan());
  return {
    workers,
    async close() {
      stopAutoScan();
      // Scans and fits resume where they stopped (windows are stored one by one; a fit is
      // rewritten whole), so their workers close without waiting for a long job to finish: the
      // job's lock lapses and the next worker takes it over.
      const sandboxed = new Set<string>([ANALYSIS_QUEUES.scan, ANALYSIS_QUEUES.fit]);
      await Promise.all(workers.map((w) => w.close(sandboxed.has(w.name)).catch((e: Error) => log.warn(`closing ${w.name}: ${e.message}`))));
      if (!opts.context) await ctx.close();
    },
  };
}
