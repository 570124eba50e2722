// Alert evaluation after a scan: runs the rule of every track (server/alerts/evaluate.ts, one
// transaction and advisory lock per track), then queues the notification e-mails and publishes the
// alert events for the transitions that are new. In-process (database-bound, light).
import { UnrecoverableError } from 'bullmq';
import { listTracks } from '../../db/queries/alerts';
import { evaluateTrackAlerts, type StoredTransition } from '../../server/alerts/evaluate';
import { enqueueNotifyAlert, evaluateAlertsJobSchema } from './analysis-queues';
import type { AnalysisContext, JobLike } from './analysis-context';

export async function runEvaluateAlerts(ctx: AnalysisContext, job: JobLike): Promise<{ transitions: number }> {
  const parsed = evaluateAlertsJobSchema.safeParse(job.data);
  if (!parsed.success) throw new UnrecoverableError(`Bad evaluate-alerts payload: ${parsed.error.issues.map((i) => i.message).join('; ')}`);
  const tracks = await listTracks(ctx.db);
  const all: StoredTransition[] = [];
  for (const t of tracks) {
    all.push(...(await evaluateTrackAlerts(ctx.db, { trackId: t.id, analysisId: parsed.data.analysisId })));
  }
  for (const t of all) {
    await enqueueNotifyAlert(ctx.queues, { alertId: t.alertId, event: t.event });
    try {
      await ctx.events.publish({
        type: `alert.${t.event}`,
        alertId: t.alertId,
        trackCode: t.trackCode,
        trackName: t.trackName,
        kind: t.kind,
        level: t.level,
        worstDamping: t.worstDamping,
        at: t.at.toISOString(),
      });
    } catch (err) {
      ctx.log.warn(`could not publish alert ${t.alertId} ${t.event}: ${(err as Error).message}`);
    }
  }
  if (all.length) ctx.log.info(`alerts: ${all.map((t) => `${t.trackCode} ${t.kind} #${t.alertId} ${t.event}`).join(', ')}`);
  return { transitions: all.length };
}
