// Queues of the analysis chain: ambient scan → alert evaluation → alert notification, and the
// ring-down fit on demand. Payloads carry ids only (validated with zod on both sides); everything
// else is read from PostgreSQL by the processor, so a retried job always sees the stored truth.
//
// Retries: transient faults (database or Redis away, a crash) retry with exponential backoff;
// bad input (an unknown recording, settings the estimator refuses) fails at once with
// UnrecoverableError and a readable reason stored on the analysis row.
import { Queue, type ConnectionOptions, type JobsOptions } from 'bullmq';
import { z } from 'zod';

export const ANALYSIS_QUEUES = {
  scan: 'scan',
  fit: 'fit',
  evaluateAlerts: 'evaluate-alerts',
  notifyAlert: 'notify-alert',
} as const;

const id = (what: string) => z.number({ error: `${what} must be a number` }).int().positive({ error: `${what} must be a positive id` });

/**
 * A scan job: the whole scan (no `block`), or one block of its windows — window indices
 * [block.from, block.to) on the scan's grid — queued by the whole-scan job when the scan is long
 * enough to be shared between workers (jobs/processors/scan.ts).
 */
export const scanJobSchema = z
  .object({
    analysisId: id('analysisId'),
    block: z
      .object({
        from: z.number({ error: 'block.from must be a number' }).int().nonnegative({ error: 'block.from must be a window index ≥ 0' }),
        to: z.number({ error: 'block.to must be a number' }).int().positive({ error: 'block.to must be a window index > 0' }),
      })
      .strict()
      .refine((b) => b.from < b.to, { error: 'block.from must be below block.to' })
      .optional(),
  })
  .strict();
export type ScanJob = z.infer<typeof scanJobSchema>;

export const fitJobSchema = z.object({ analysisId: id('analysisId') }).strict();
export type FitJob = z.infer<typeof fitJobSchema>;

/** Evaluate every track after a scan (analysisId) or over the whole history (no analysisId). */
export const evaluateAlertsJobSchema = z.object({ analysisId: id('analysisId').optional() }).strict();
export type EvaluateAlertsJob = z.infer<typeof evaluateAlertsJobSchema>;

export const notifyAlertJobSchema = z
  .object({ alertId: id('alertId'), event: z.enum(['opened', 'escalated', 'cleared']) })
  .strict();
export type NotifyAlertJob = z.infer<typeof notifyAlertJobSchema>;

/** CPU-heavy analyses: 3 attempts, 5 s → 10 s backoff. */
export const ANALYSIS_JOB_OPTIONS: JobsOptions = {
  attempts: 3,
  backoff: { type: 'exponential', delay: 5000 },
  removeOnComplete: { age: 24 * 3600, count: 1000 },
  removeOnFail: { age: 7 * 24 * 3600, count: 1000 },
};

/** Light database jobs: 5 attempts, 1 → 8 s backoff. */
export const LIGHT_JOB_OPTIONS: JobsOptions = {
  attempts: 5,
  backoff: { type: 'exponential', delay: 1000 },
  removeOnComplete: true,
  removeOnFail: { age: 7 * 24 * 3600, count: 1000 },
};

/**
 * Lock settings of the analysis workers: a crashed worker's job is taken over by another worker
 * (or the restarted one) once its lock lapses — after about lockDuration + stalledInterval.
 */
export const ANALYSIS_LOCK = { lockDuration: 20_000, stalledInterval: 10_000, maxStalledCount: 3 };

export interface AnalysisQueues {
  scan: Queue<ScanJob>;
  fit: Queue<FitJob>;
  evaluateAlerts: Queue<EvaluateAlertsJob>;
  notifyAlert: Queue<NotifyAlertJob>;
  close(): Promise<void>;
}

export function createAnalysisQueues(connection: ConnectionOptions, prefix: string): AnalysisQueues {
  const scan = new Queue<ScanJob>(ANALYSIS_QUEUES.scan, { connection, prefix, defaultJobOptions: ANALYSIS_JOB_OPTIONS });
  const fit = new Queue<FitJob>(ANALYSIS_QUEUES.fit, { connection, prefix, defaultJobOptions: ANALYSIS_JOB_OPTIONS });
  const evaluateAlerts = new Queue<EvaluateAlertsJob>(ANALYSIS_QUEUES.evaluateAlerts, { connection, prefix, defaultJobOptions: LIGHT_JOB_OPTIONS });
  const notifyAlert = new Queue<NotifyAlertJob>(ANALYSIS_QUEUES.notifyAlert, { connection, prefix, defaultJobOptions: LIGHT_JOB_OPTIONS });
  const all = [scan, fit, evaluateAlerts, notifyAlert];
  for (const q of all) q.on('error', (e: Error) => console.warn(`[queues] ${q.name}: ${e.message}`));
  return {
    scan,
    fit,
    evaluateAlerts,
    notifyAlert,
    async close() {
      await Promise.all(all.map((q) => q.close().catch(() => undefined)));
    },
  };
}

/** Job ids make enqueueing idempotent: one scan job per analysis, one evaluation per scan. */
export async function enqueueScan(queues: Pick<AnalysisQueues, 'scan'>, payload: ScanJob): Promise<string> {
  const p = scanJobSchema.parse(payload);
  const job = await queues.scan.add('scan', p, { jobId: `scan-${p.analysisId}` });
  return job.id!;
}

/** Queues the blocks of a scan (idempotent: one job id per block start). Returns the job ids. */
export async function enqueueScanBlocks(queues: Pick<AnalysisQueues, 'scan'>, analysisId: number, blocks: { from: number; to: number }[]): Promise<string[]> {
  const jobs = blocks.map((block) => {
    const data = scanJobSchema.parse({ analysisId, block });
    return { name: 'scan-block', data, opts: { jobId: `scan-${analysisId}-w${block.from}` } };
  });
  const added = await queues.scan.addBulk(jobs);
  return added.map((j) => j.id!);
}

export async function enqueueFit(queues: Pick<AnalysisQueues, 'fit'>, payload: FitJob): Promise<string> {
  const p = fitJobSchema.parse(payload);
  const job = await queues.fit.add('fit', p, { jobId: `fit-${p.analysisId}` });
  return job.id!;
}

export async function enqueueEvaluateAlerts(queues: Pick<AnalysisQueues, 'evaluateAlerts'>, payload: EvaluateAlertsJob): Promise<string> {
  const p = evaluateAlertsJobSchema.parse(payload);
  // No fixed job id: the evaluation is idempotent, and one queued after a retried scan must run.
  const job = await queues.evaluateAlerts.add('evaluate-alerts', p);
  return job.id!;
}

export async function enqueueNotifyAlert(queues: Pick<AnalysisQueues, 'notifyAlert'>, payload: NotifyAlertJob): Promise<string> {
  const p = notifyAlertJobSchema.parse(payload);
  const job = await queues.notifyAlert.add('notify-alert', p, { jobId: `notify-${p.alertId}-${p.event}` });
  return job.id!;
}
