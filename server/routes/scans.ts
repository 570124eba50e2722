// Ambient scans: queue one (engineer/admin), list analyses, a scan's windows and modes.
import { recordAudit } from '../../db/queries/audit';
import { trackIndex } from '../../db/queries/estimates';
import {
  createAnalysis,
  failAnalysis,
  getAnalysis,
  getRecording,
  listAnalyses,
  recordingChannelList,
  scanResults,
  setAnalysisJob,
  windowCounts,
  type AnalysisRow,
} from '../../db/queries/scans';
import { enqueueScan } from '../../jobs/processors/analysis-queues';
import { publishProgress } from '../../jobs/processors/analysis-progress';
import { checkAmbientOptions, DEFAULT_AMBIENT_OPTIONS, type AmbientOptionsInput } from '../../modal/ambient';
import { ModalInputError } from '../../modal/errors';
import type { Deps } from '../deps';
import { ConflictError, NotFoundError, UnavailableError, ValidationError } from '../errors';
import { analysisQueues, liveBus } from '../events/live';
import { toAnalysisSummary, toModeEstimate } from './analysis-dto';
import { route, type RouteDef } from './registry';

/** The recording must exist and be ready; the answer says which it is not. */
export async function readyRecording(deps: Deps, id: number) {
  const rec = await getRecording(deps.db, { id });
  if (!rec) throw new NotFoundError(`No recording with id ${id}`);
  if (rec.status !== 'ready' || !rec.rate || !rec.sampleCount || !rec.startTime || !rec.endTime) {
    throw new ConflictError(`Recording ${id} is not ready (status ${rec.status}); analyse it once its ingest is done`);
  }
  return rec as typeof rec & { rate: number; sampleCount: number; startTime: Date; endTime: Date };
}

/** Publishes a queued analysis, queues its job, and marks it failed if the queue is unreachable. */
export async function queueAnalysis(deps: Deps, analysis: AnalysisRow, add: () => Promise<string>): Promise<void> {
  try {
    const jobId = await add();
    await setAnalysisJob(deps.db, { id: analysis.id, jobId });
  } catch (err) {
    await failAnalysis(deps.db, { id: analysis.id, error: `Could not be queued: ${(err as Error).message}` });
    throw new UnavailableError('The job queue is unavailable; try again shortly');
  }
  await publishProgress({ events: liveBus(deps), log: deps.log }, analysis);
}

export async function analysisSummaries(deps: Deps, rows: AnalysisRow[]) {
  const counts = await windowCounts(deps.db, { analysisIds: rows.filter((r) => r.kind === 'scan').map((r) => r.id) });
  const names = new Map<number, string>();
  for (const id of new Set(rows.map((r) => r.recordingId))) {
    const rec = await getRecording(deps.db, { id });
    if (rec) names.set(id, rec.fileName);
  }
  return rows.map((r) => toAnalysisSummary(r, { recordingName: names.get(r.recordingId) ?? null, windows: counts.get(r.id) ?? 0 }));
}

export function scanRoutes(): RouteDef[] {
  return [
    route('scans.create', async ({ deps, params, body, person, ip }) => {
      const rec = await readyRecording(deps, params.id);
      const channels = await recordingChannelList(deps.db, { recordingId: rec.id });
      let resolved;
      try {
        resolved = checkAmbientOptions(body.settings as AmbientOptionsInput, {
          rate: rec.rate,
          channelNames: channels.map((c) => c.name),
          durationSeconds: rec.sampleCount / rec.rate,
        });
      } catch (err) {
        if (err instanceof ModalInputError) throw new ValidationError(`Scan settings refused: ${err.message}`, [{ path: 'settings', message: err.message }]);
        throw err;
      }
      // Store the complete options actually used (defaults filled in), in the estimator's own terms.
      const settings: Record<string, unknown> = {};
      for (const k of Object.keys(DEFAULT_AMBIENT_OPTIONS)) settings[k] = (resolved as unknown as Record<string, unknown>)[k];
      const analysis = await createAnalysis(deps.db, { kind: 'scan', recordingId: rec.id, method: resolved.method, settings, createdBy: person!.id });
      await recordAudit(deps.db, {
        personId: person!.id,
        action: 'scan.start',
        target: `analysis:${analysis.id}`,
        details: { recording: rec.id, windowSeconds: resolved.windowSeconds, stepSeconds: resolved.stepSeconds, method: resolved.method },
        ip,
      });
      await queueAnalysis(deps, analysis, () => enqueueScan(analysisQueues(deps), { analysisId: analysis.id }));
      const [summary] = await analysisSummaries(deps, [(await getAnalysis(deps.db, { id: analysis.id })) ?? analysis]);
      return { analysis: summary };
    }),

    route('analyses.list', async ({ deps, query }) => {
      const rows = await listAnalyses(deps.db, { recordingId: query.recording, kind: query.kind, status: query.status, limit: query.limit });
      return { analyses: await analysisSummaries(deps, rows) };
    }),

    route('scans.get', async ({ deps, params }) => {
      const a = await getAnalysis(deps.db, { id: params.id });
      if (!a || a.kind !== 'scan') throw new NotFoundError(`No scan with id ${params.id}`);
      const [summary] = await analysisSummaries(deps, [a]);
      const tracks = await trackIndex(deps.db);
      const windows = await scanResults(deps.db, { analysisId: a.id });
      return {
        analysis: summary,
        windows: windows.map((w) => {
          const q = (w.quality ?? {}) as { skipped?: unknown; reason?: unknown };
          return {
            id: w.id,
            start: w.startTime.toISOString(),
            end: w.endTime.toISOString(),
            skipped: q.skipped === true,
            reason: typeof q.reason === 'string' ? q.reason : null,
            transferMw: w.transferMw ?? {},
            angleDeg: w.angleDeg ?? {},
            modes: w.estimates.map((e) => toModeEstimate(e, tracks)),
          };
        }),
      };
    }),
  ];
}
