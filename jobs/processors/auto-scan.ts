// The chain ingest → ambient scan (DESIGN.md §5.2): every ready recording long enough for one
// window that has no scan yet gets one with the default settings. Whichever way a recording
// arrived (an upload ingested within the request, the ingest job, the demo seed), the worker's
// sweep finds it within a few seconds; a per-recording advisory lock and the "no scan yet" check
// in the same transaction make sure it is queued once, whatever number of workers sweep.
//
// Turn it off with KEEL_AUTO_SCAN=0 (scans then start only from POST /api/recordings/:id/scans).
import { sql } from 'drizzle-orm';
import type { Db, DbOrTx } from '../../db/client';
import { recordAudit } from '../../db/queries/audit';
import { createAnalysis, failAnalysis, recordingChannelList, setAnalysisJob, type AnalysisRow } from '../../db/queries/scans';
import { checkAmbientOptions, DEFAULT_AMBIENT_OPTIONS, type AmbientOptionsInput } from '../../modal/ambient';
import { ModalInputError } from '../../modal/errors';
import type { AnalysisContext } from './analysis-context';
import { publishProgress } from './analysis-progress';
import { enqueueScan } from './analysis-queues';

export const AUTO_SCAN_INTERVAL_MS = 3000;

export function autoScanEnabled(env: NodeJS.ProcessEnv = process.env): boolean {
  return !['0', 'false', 'no'].includes((env.KEEL_AUTO_SCAN ?? '').toLowerCase());
}

/** The complete scan settings (defaults filled in) for a recording, or the estimator's refusal. */
export async function scanSettingsFor(
  db: DbOrTx,
  rec: { id: number; rate: number; sampleCount: number },
  input: AmbientOptionsInput = {},
): Promise<{ settings: Record<string, unknown>; method: string } | { error: string }> {
  const channels = await recordingChannelList(db, { recordingId: rec.id });
  try {
    const o = checkAmbientOptions(input, { rate: rec.rate, channelNames: channels.map((c) => c.name), durationSeconds: rec.sampleCount / rec.rate });
    const settings: Record<string, unknown> = {};
    for (const k of Object.keys(DEFAULT_AMBIENT_OPTIONS)) settings[k] = (o as unknown as Record<string, unknown>)[k];
    return { settings, method: o.method };
  } catch (err) {
    if (err instanceof ModalInputError) return { error: err.message };
    throw err;
  }
}

/**
 * Creates the scan analysis of a recording unless it has one (under a per-recording lock) and
 * returns it, or null when a scan already existed. The caller queues the job after the commit.
 */
export async function createScanOnce(
  db: Db,
  params: { recordingId: number; settings?: AmbientOptionsInput; createdBy?: number | null },
): Promise<AnalysisRow | null> {
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(4712, ${params.recordingId})`);
    const exists = await tx.execute(sql`select 1 from analyses where recording_id = ${params.recordingId} and kind = 'scan' limit 1`);
    if (exists.rows.length > 0) return null;
    const rec = await tx.execute(sql`select id, rate, sample_count from recordings where id = ${params.recordingId} and status = 'ready'`);
    const r = rec.rows[0] as { id: number; rate: number; sample_count: number } | undefined;
    if (!r) return null;
    const s = await scanSettingsFor(tx, { id: r.id, rate: Number(r.rate), sampleCount: Number(r.sample_count) }, params.settings);
    const analysis = await createAnalysis(tx, {
      kind: 'scan',
      recordingId: r.id,
      method: 'error' in s ? null : s.method,
      settings: 'error' in s ? { ...(params.settings ?? {}) } : s.settings,
      createdBy: params.createdBy ?? null,
    });
    // The audit trail covers scans nobody asked for too: who = nobody (the system), and why.
    await recordAudit(tx, {
      personId: params.createdBy ?? null,
      action: 'scan.start',
      target: `analysis:${analysis.id}`,
      details: { recording: r.id, automatic: true, ...('error' in s ? { refused: s.error } : { method: s.method, windowSeconds: s.settings.windowSeconds, stepSeconds: s.settings.stepSeconds }) },
    });
    if ('error' in s) {
      // recorded as a failed scan with the reason, so the sweep does not try again and again
      return (await failAnalysis(tx, { id: analysis.id, error: `Default scan refused: ${s.error}` })) ?? analysis;
    }
    return analysis;
  });
}

/** Queues a created scan analysis (no-op for one that already failed). */
export async function queueCreatedScan(ctx: Pick<AnalysisContext, 'db' | 'queues' | 'events' | 'log'>, analysis: AnalysisRow): Promise<void> {
  if (analysis.status === 'failed') {
    await publishProgress(ctx, analysis);
    return;
  }
  const jobId = await enqueueScan(ctx.queues, { analysisId: analysis.id });
  await setAnalysisJob(ctx.db, { id: analysis.id, jobId });
  await publishProgress(ctx, analysis);
}

/** One sweep: queue default scans for ready recordings without one. Returns the analyses created. */
export async function sweepAutoScans(ctx: Pick<AnalysisContext, 'db' | 'queues' | 'events' | 'log'>, limit = 20): Promise<AnalysisRow[]> {
  const windowSeconds = DEFAULT_AMBIENT_OPTIONS.windowSeconds;
  const candidates = await ctx.db.execute(sql`
    select r.id from recordings r
     where r.status = 'ready' and r.rate > 0 and r.sample_count / r.rate >= ${windowSeconds}
       and not exists (select 1 from analyses a where a.recording_id = r.id and a.kind = 'scan')
     order by r.id limit ${limit}`);
  const created: AnalysisRow[] = [];
  for (const row of candidates.rows as { id: number }[]) {
    const a = await createScanOnce(ctx.db, { recordingId: Number(row.id) });
    if (!a) continue;
    try {
      await queueCreatedScan(ctx, a);
      created.push(a);
      ctx.log.info(`auto-scan: queued scan ${a.id} of recording ${row.id}`);
    } catch (err) {
      await failAnalysis(ctx.db, { id: a.id, error: `Could not be queued: ${(err as Error).message}` });
      ctx.log.warn(`auto-scan: could not queue the scan of recording ${row.id}: ${(err as Error).message}`);
    }
  }
  return created;
}

/** Sweeps every `intervalMs` until stopped. */
export function startAutoScan(ctx: Pick<AnalysisContext, 'db' | 'queues' | 'events' | 'log'>, intervalMs = AUTO_SCAN_INTERVAL_MS): () => void {
  let running = false;
  let stopped = false;
  const tick = async () => {
    if (running || stopped) return;
    running = true;
    try {
      await sweepAutoScans(ctx);
    } catch (err) {
      ctx.log.warn(`auto-scan sweep: ${(err as Error).message}`);
    } finally {
      running = false;
    }
  };
  const timer = setInterval(() => void tick(), intervalMs);
  (timer as unknown as { unref?: () => void }).unref?.();
  void tick();
  return () => {
    stopped = true;
    clearInterval(timer);
  };
}
