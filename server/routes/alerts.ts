// Alerts: list, detail (damping trace, worst mode shape, notifications, history), acknowledge.
import { alertHistory, getAlertWithTrack, listAlerts, lockAlert, notificationsOf, updateAlert } from '../../db/queries/alerts';
import { recordAudit } from '../../db/queries/audit';
import { estimateDetail, shapeOf, trackEstimates } from '../../db/queries/estimates';
import { ADVISORY_CAUTION } from '../../shared/api/alerts';
import { ConflictError, NotFoundError } from '../errors';
import { liveBus } from '../events/live';
import { iso, isoOrNull, toAlertSummary, toShapeEntry } from './analysis-dto';
import { route, type RouteDef } from './registry';

/** The damping trace spans an hour either side of the alert. */
const TRACE_MARGIN_MS = 3600 * 1000;

export function alertRoutes(): RouteDef[] {
  return [
    route('alerts.list', async ({ deps, query }) => {
      const rows = await listAlerts(deps.db, { state: query.state, trackCode: query.track, limit: query.limit });
      const now = deps.now();
      return { alerts: rows.map((a) => toAlertSummary(a, now)), caution: ADVISORY_CAUTION };
    }),

    route('alerts.get', async ({ deps, params }) => {
      const a = await getAlertWithTrack(deps.db, { id: params.id });
      if (!a) throw new NotFoundError(`No alert with id ${params.id}`);
      const now = deps.now();
      const { alert } = a;
      // From an hour before the opening streak to an hour after clearing (or to the newest estimate).
      const traceFrom = new Date(alert.openedAt.getTime() - TRACE_MARGIN_MS);
      const traceTo = new Date((alert.clearedAt ?? now).getTime() + (alert.clearedAt ? TRACE_MARGIN_MS : 0));
      const trace = await trackEstimates(deps.db, { trackId: alert.trackId, from: traceFrom, to: traceTo, limit: 20_000 });
      let worstShape: ReturnType<typeof toShapeEntry>[] = [];
      let worstAt: string | null = null;
      if (alert.worstEstimateId !== null) {
        const d = await estimateDetail(deps.db, { id: alert.worstEstimateId });
        if (d) {
          worstAt = iso(d.estimate.at);
          worstShape = (await shapeOf(deps.db, { estimateId: d.estimate.id })).map(toShapeEntry);
        }
      }
      const notifications = await notificationsOf(deps.db, { alertId: alert.id });
      const history = await alertHistory(deps.db, { alertId: alert.id });
      return {
        alert: toAlertSummary(a, now),
        caution: ADVISORY_CAUTION,
        trace: trace.map((e) => ({
          estimateId: e.id,
          at: iso(e.at),
          frequencyHz: e.frequencyHz,
          dampingPercent: e.dampingPercent,
          dampingLo: e.dampingLo,
          dampingHi: e.dampingHi,
          forced: e.forced,
        })),
        traceFrom: iso(traceFrom),
        traceTo: iso(traceTo),
        worstShape,
        worstAt,
        notifications: notifications.map((n) => ({ personId: n.personId, displayName: n.displayName, email: n.email, event: n.event, sentAt: isoOrNull(n.sentAt) })),
        history: history.map((h) => ({ at: iso(h.at), action: h.action, personId: h.personId, displayName: h.displayName, details: h.details })),
      };
    }),

    route('alerts.acknowledge', async ({ deps, params, body, person, ip }) => {
      const actor = person!;
      const now = deps.now();
      await deps.db.transaction(async (tx) => {
        const alert = await lockAlert(tx, { id: params.id });
        if (!alert) throw new NotFoundError(`No alert with id ${params.id}`);
        if (alert.state === 'cleared') throw new ConflictError(`Alert ${alert.id} is already cleared; there is nothing to acknowledge`);
        if (alert.state === 'acknowledged') {
          throw new ConflictError(`Alert ${alert.id} is already acknowledged (${alert.acknowledgedAt?.toISOString() ?? 'earlier'}); it needs no second acknowledgement unless it escalates`);
        }
        await updateAlert(tx, { id: alert.id, values: { state: 'acknowledged', acknowledgedBy: actor.id, acknowledgedAt: now, note: body.note } });
        await recordAudit(tx, {
          personId: actor.id,
          action: 'alert.acknowledged',
          target: `alert:${alert.id}`,
          details: { note: body.note, level: alert.level, previousNote: alert.note },
          ip,
        });
      });
      const a = (await getAlertWithTrack(deps.db, { id: params.id }))!;
      try {
        await liveBus(deps).publish({
          type: 'alert.acknowledged',
          alertId: a.alert.id,
          trackCode: a.track.code,
          trackName: a.track.name,
          kind: a.alert.kind,
          level: a.alert.level,
          worstDamping: a.alert.worstDamping,
          at: now.toISOString(),
        });
      } catch (err) {
        deps.log.warn(`could not publish the acknowledgement of alert ${a.alert.id}: ${(err as Error).message}`);
      }
      return { alert: toAlertSummary(a, now) };
    }),
  ];
}
