// The ingest job: a large upload, already spooled to disk by the server under a name the server
// chose, is parsed, checked and stored off the request path. The recording row (status
// 'ingesting') and its ingest analysis were created by the upload request; this job streams the
// file into the recording in ONE transaction and reports progress 0..1 on the analysis row (and
// the live-event stream). A bad file is an unrecoverable failure: the transaction rolls back (no
// samples, no channels kept), the recording is marked failed with the message (line and reason),
// and so is the analysis. Transient faults (database away) retry with backoff; the spool file is
// kept until the last attempt. Runs in process: the work is streaming I/O in small slices.
//
// The worker must see the server's spool folder (KEEL_SPOOL_DIR): same machine or a shared volume.
import fs from 'node:fs';
import path from 'node:path';
import { Queue, UnrecoverableError, Worker, type ConnectionOptions, type Job, type JobsOptions } from 'bullmq';
import { Redis } from 'ioredis';
import { z } from 'zod';
import { createDb, createPool, type Db } from '../../db/client';
import { getRecording, setRecordingStatus } from '../../db/queries/recordings';
import { finishAnalysis, getAnalysis, markAnalysisRunning, setAnalysisProgress, type AnalysisRow } from '../../db/queries/scans';
import { loadConfig } from '../../server/config';
import { consoleLogger, type Logger } from '../../server/deps';
import { createEventPublisher, eventChannel, type EventPublisher } from '../../server/events/bus';
import { isIngestError } from '../../server/ingest/errors';
import { removeSpooled } from '../../server/ingest/spool';
import { ingestSettings } from '../../server/ingest/settings';
import { prepareUpload, storeUpload } from '../../server/ingest/store';
import { failAnalysisWith, publishProgress } from './analysis-progress';
import { isLastAttempt, type JobLike } from './analysis-context';

export const INGEST_QUEUE = 'ingest';

const id = (what: string) => z.number({ error: `${what} must be a number` }).int().positive({ error: `${what} must be a positive id` });

export const ingestJobSchema = z
  .object({
    analysisId: id('analysisId'),
    recordingId: id('recordingId'),
    files: z
      .array(
        z
          .object({
            /** The client's file name: shown in messages, never used as a path. */
            originalName: z.string().min(1).max(500),
            /** Spool path chosen by the server. */
            path: z.string().min(1).max(4096),
            size: z.number().int().nonnegative(),
            sha256: z.string().regex(/^[0-9a-f]{64}$/),
          })
          .strict(),
      )
      .min(1)
      .max(3),
    mapping: z.record(z.string(), z.string()).optional(),
  })
  .strict();
export type IngestJob = z.infer<typeof ingestJobSchema>;

/** 3 attempts, 2 s → 4 s backoff (a database restart); bad files fail at once. */
export const INGEST_JOB_OPTIONS: JobsOptions = {
  attempts: 3,
  backoff: { type: 'exponential', delay: 2000 },
  removeOnComplete: { age: 24 * 3600, count: 1000 },
  removeOnFail: { age: 7 * 24 * 3600, count: 1000 },
};

export function createIngestQueue(connection: ConnectionOptions, prefix: string): Queue<IngestJob> {
  const q = new Queue<IngestJob>(INGEST_QUEUE, { connection, prefix, defaultJobOptions: INGEST_JOB_OPTIONS });
  q.on('error', (e: Error) => console.warn(`[queues] ${INGEST_QUEUE}: ${e.message}`));
  return q;
}

/** One job per ingest analysis (the job id makes a repeated enqueue harmless). */
export async function enqueueIngest(queue: Queue<IngestJob>, payload: IngestJob): Promise<string> {
  const p = ingestJobSchema.parse(payload);
  const job = await queue.add('ingest', p, { jobId: `ingest-${p.analysisId}` });
  return job.id!;
}

export interface IngestContext {
  db: Db;
  events: EventPublisher;
  log: Logger;
  /** The spool folder: job paths outside it are refused (a forged job cannot read other files). */
  spoolDir: string;
}

export interface IngestOutcome {
  recordingId: number;
  frames: number;
  channels: number;
}

/** Progress is written to the analysis row at most this often (and at the end). */
const PROGRESS_EVERY_MS = 500;

export async function runIngestJob(ctx: IngestContext, job: JobLike): Promise<IngestOutcome | null> {
  const parsed = ingestJobSchema.safeParse(job.data);
  if (!parsed.success) throw new UnrecoverableError(`Malformed ingest job: ${parsed.error.issues[0]?.message ?? 'invalid payload'}`);
  const p = parsed.data;
  const spoolRoot = path.resolve(ctx.spoolDir) + path.sep;
  for (const f of p.files) {
    if (!path.resolve(f.path).startsWith(spoolRoot)) {
      throw new UnrecoverableError(`Ingest job ${job.id ?? '?'}: file path outside the spool folder`);
    }
  }
  const paths = p.files.map((f) => f.path);
  const analysis = await getAnalysis(ctx.db, { id: p.analysisId });
  const recording = await getRecording(ctx.db, { id: p.recordingId });
  if (!analysis || !recording) {
    // Deleted while queued: nothing to do but tidy up.
    await removeSpooled(paths);
    return null;
  }
  if (recording.status === 'ready') {
    // A previous attempt committed but stopped before reporting: report now.
    await removeSpooled(paths);
    const done = await finishAnalysis(ctx.db, { id: analysis.id });
    if (done) await publishProgress(ctx, done);
    return { recordingId: recording.id, frames: recording.sampleCount ?? 0, channels: recording.channelCount ?? 0 };
  }
  for (const f of p.files) {
    const present = await fs.promises.access(f.path).then(
      () => true,
      () => false,
    );
    if (!present) {
      // Swept after a day in the queue, or this worker does not share the server's spool folder.
      const reason = `The uploaded file "${f.originalName}" is no longer in the spool folder (worker on another machine than the server, or queued too long); upload it again`;
      await failIngest(ctx, analysis, recording.id, reason);
      await removeSpooled(paths);
      throw new UnrecoverableError(reason);
    }
  }
  const running = await markAnalysisRunning(ctx.db, { id: analysis.id });
  if (running) await publishProgress(ctx, running);
  const t0 = Date.now();
  let lastWrite = 0;
  const onProgress = async (fraction: number) => {
    const now = Date.now();
    if (now - lastWrite < PROGRESS_EVERY_MS && fraction < 1) return;
    lastWrite = now;
    // Outside the ingest transaction, so that pollers see it while the data are still uncommitted.
    const shown = Math.min(0.99, fraction);
    await setAnalysisProgress(ctx.db, { id: analysis.id, progress: shown });
    await job.updateProgress(shown).catch(() => undefined);
    await publishProgress(ctx, { ...(running ?? analysis), status: 'running', progress: shown, error: null });
  };
  try {
    const summary = await ctx.db.transaction(async (tx) => {
      const prepared = await prepareUpload(tx, { files: p.files, mapping: p.mapping, ownRecordingId: recording.id });
      const totalBytes = prepared.source.totalBytes;
      const s = await storeUpload(tx, {
        recordingId: recording.id,
        prepared,
        maxGapSeconds: ingestSettings().maxGapSeconds,
        onProgress,
        progressEvery: Math.max(256 * 1024, Math.floor(totalBytes / 100)),
      });
      await finishAnalysis(tx, {
        id: analysis.id,
        timings: { ingest: Date.now() - t0 },
      });
      return s;
    });
    await removeSpooled(paths);
    const done = await getAnalysis(ctx.db, { id: analysis.id });
    if (done) await publishProgress(ctx, done);
    ctx.log.info(
      `ingested recording ${recording.id} (${recording.fileName}): ${summary.frames} frames × ${summary.channels.length} channels at ${summary.rate} frames/s in ${Date.now() - t0} ms`,
    );
    return { recordingId: recording.id, frames: summary.frames, channels: summary.channels.length };
  } catch (err) {
    if (isIngestError(err)) {
      await failIngest(ctx, analysis, recording.id, err.message);
      await removeSpooled(paths);
      throw new UnrecoverableError(err.message);
    }
    if (isLastAttempt(job)) {
      await failIngest(ctx, analysis, recording.id, `The ingest stopped after ${job.attemptsMade + 1} attempts: ${(err as Error).message}`);
      await removeSpooled(paths);
    }
    throw err;
  }
}

async function failIngest(ctx: IngestContext, analysis: AnalysisRow, recordingId: number, reason: string): Promise<void> {
  await setRecordingStatus(ctx.db, { id: recordingId, status: 'failed', error: reason }).catch((e: Error) =>
    ctx.log.error(`could not mark recording ${recordingId} failed`, e),
  );
  await failAnalysisWith(ctx, analysis, reason);
}

/**
 * The ingest worker of a worker process (registered by jobs/worker.ts). It opens its own database
 * pool and event publisher from the environment and closes them when the worker closes.
 */
export function createIngestWorker(opts: {
  connection: ConnectionOptions;
  prefix: string;
  log?: Logger;
  env?: NodeJS.ProcessEnv;
  concurrency?: number;
}): Worker {
  const env = opts.env ?? process.env;
  const config = loadConfig(env);
  const log = opts.log ?? consoleLogger('ingest');
  const pool = createPool(config.databaseUrl, { max: 4, onError: (e) => log.warn(`database connection lost: ${e.message}`) });
  const publisher = new Redis(config.redisUrl, { maxRetriesPerRequest: null });
  publisher.on('error', (e: Error) => log.warn(`redis (ingest events): ${e.message}`));
  const ctx: IngestContext = {
    db: createDb(pool),
    events: createEventPublisher(publisher, eventChannel(config.queuePrefix)),
    log,
    spoolDir: ingestSettings(env).spoolDir,
  };
  const worker = new Worker(INGEST_QUEUE, (job: Job) => runIngestJob(ctx, job), {
    connection: opts.connection,
    prefix: opts.prefix,
    concurrency: opts.concurrency ?? 2,
    // A running ingest is one transaction: closing the worker waits for it rather than
    // stopping half-way (which would only roll it back and redo it).
    lockDuration: 30_000,
  });
  worker.on('closed', () => {
    void publisher.quit().catch(() => publisher.disconnect());
    void pool.end().catch(() => undefined);
  });
  return worker;
}
