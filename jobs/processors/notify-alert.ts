// Alert notification: one e-mail per subscriber of the track for an alert event, handed to the
// e-mail job (jobs/processors/send-email.ts, nodemailer → SMTP). The people to tell were fixed
// when the transition was stored (alert_notifications); each is marked sent once its e-mail job
// is queued, so a retried job only sends what is still pending.
import { UnrecoverableError } from 'bullmq';
import { getAlertWithTrack, markNotificationSent, pendingNotifications } from '../../db/queries/alerts';
import { alertEmail } from '../../server/alerts/email';
import { enqueueEmail } from '../queues';
import { notifyAlertJobSchema } from './analysis-queues';
import type { AnalysisContext, JobLike } from './analysis-context';

export async function runNotifyAlert(ctx: AnalysisContext, job: JobLike): Promise<{ sent: number }> {
  const parsed = notifyAlertJobSchema.safeParse(job.data);
  if (!parsed.success) throw new UnrecoverableError(`Bad notify-alert payload: ${parsed.error.issues.map((i) => i.message).join('; ')}`);
  const { alertId, event } = parsed.data;
  const found = await getAlertWithTrack(ctx.db, { id: alertId });
  if (!found) throw new UnrecoverableError(`Alert ${alertId} does not exist`);
  const { alert, track } = found;
  let sent = 0;
  for (const p of await pendingNotifications(ctx.db, { alertId, event })) {
    await enqueueEmail(
      ctx.emailQueue,
      alertEmail({
        to: p.email,
        displayName: p.displayName,
        event,
        alertId,
        kind: alert.kind,
        level: alert.level,
        trackName: track.name,
        poorBelow: track.poorBelow,
        lowBelow: track.lowBelow,
        worstDamping: alert.worstDamping,
        openedAt: alert.openedAt,
        escalatedAt: alert.escalatedAt,
        clearedAt: alert.clearedAt,
        appUrl: ctx.appUrl,
      }),
    );
    await markNotificationSent(ctx.db, { id: p.id });
    sent++;
  }
  return { sent };
}
