// Analysis status as clients see it: the row in PostgreSQL (the truth, polled by the screens) and
// the same news on the live-event stream. Publishing is best effort — a Redis hiccup must not fail
// an analysis whose results are already stored.
import { failAnalysis, type AnalysisRow } from '../../db/queries/scans';
import type { AnalysisContext } from './analysis-context';

type ProgressView = Pick<AnalysisRow, 'id' | 'recordingId' | 'kind' | 'status' | 'progress' | 'error'>;

export async function publishProgress(ctx: Pick<AnalysisContext, 'events' | 'log'>, a: ProgressView): Promise<void> {
  try {
    await ctx.events.publish({
      type: 'analysis.progress',
      analysisId: a.id,
      recordingId: a.recordingId,
      kind: a.kind,
      status: a.status,
      progress: Math.min(1, Math.max(0, a.progress)),
      error: a.error,
      at: new Date().toISOString(),
    });
  } catch (err) {
    ctx.log.warn(`could not publish progress of analysis ${a.id}: ${(err as Error).message}`);
  }
}

/** Marks the analysis failed with a reason a person can act on, and says so on the stream. */
export async function failAnalysisWith(ctx: Pick<AnalysisContext, 'db' | 'events' | 'log'>, a: AnalysisRow, reason: string): Promise<void> {
  const row = await failAnalysis(ctx.db, { id: a.id, error: reason }).catch((err: Error) => {
    ctx.log.error(`could not store the failure of analysis ${a.id}`, err);
    return undefined;
  });
  await publishProgress(ctx, row ?? { ...a, status: 'failed', error: reason });
}
