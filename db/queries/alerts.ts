// Alerts: the inputs of the alert rule (a track's scan windows with its estimates), alert rows,
// notifications and subscriptions.
import { and, asc, desc, eq, gt, inArray, isNull, lt, or, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { alertNotifications, alerts, analyses, auditLog, modeEstimates, modeTracks, people, scanWindows, trackSubscriptions } from '../schema';

export type AlertRow = typeof alerts.$inferSelect;
export type AlertKindValue = AlertRow['kind'];
export type AlertStateValue = AlertRow['state'];
export type TrackRow = typeof modeTracks.$inferSelect;
export type NotificationRow = typeof alertNotifications.$inferSelect;

/** One scan window as the alert rule sees it, for one track (epoch seconds). */
export interface TrackWindow {
  windowId: number;
  analysisId: number;
  start: number;
  end: number;
  stepSeconds: number;
  skipped: boolean;
  natural: TrackWindowEstimate | null;
  forced: TrackWindowEstimate | null;
}

export interface TrackWindowEstimate {
  id: number;
  dampingPercent: number;
  ciLow: number;
  ciHigh: number;
  frequencyHz: number;
  forced: boolean;
}

const DEFAULT_STEP_SECONDS = 60;

function stepOf(settings: Record<string, unknown> | null): number {
  const s = settings?.stepSeconds;
  return typeof s === 'number' && s > 0 ? s : DEFAULT_STEP_SECONDS;
}

/**
 * Scan windows (of every scan, one per window start: the newest analysis wins where scans overlap)
 * with the track's natural and forced estimates, in time order. `after`/`before` bound the window
 * starts (exclusive); `limit` with `descending` pages backwards.
 */
export async function trackWindows(
  db: DbOrTx,
  params: { trackId: number; after?: Date | null; before?: Date | null; limit?: number; descending?: boolean },
): Promise<TrackWindow[]> {
  const conds: SQL[] = [eq(analyses.kind, 'scan')];
  if (params.after) conds.push(gt(scanWindows.startTime, params.after));
  if (params.before) conds.push(lt(scanWindows.startTime, params.before));
  const dedup = db
    .selectDistinctOn([scanWindows.startTime], {
      id: scanWindows.id,
      analysisId: scanWindows.analysisId,
      start: scanWindows.startTime,
      end: scanWindows.endTime,
      quality: scanWindows.quality,
      settings: analyses.settings,
    })
    .from(scanWindows)
    .innerJoin(analyses, eq(analyses.id, scanWindows.analysisId))
    .where(and(...conds))
    .orderBy(params.descending ? desc(scanWindows.startTime) : asc(scanWindows.startTime), desc(scanWindows.analysisId));
  const rows = params.limit ? await dedup.limit(params.limit) : await dedup;
  if (rows.length === 0) return [];
  const ests = await db
    .select({
      id: modeEstimates.id,
      windowId: modeEstimates.windowId,
      dampingPercent: modeEstimates.dampingPercent,
      dampingLo: modeEstimates.dampingLo,
      dampingHi: modeEstimates.dampingHi,
      frequencyHz: modeEstimates.frequencyHz,
      forced: modeEstimates.forced,
      amplitude: modeEstimates.amplitude,
    })
    .from(modeEstimates)
    .where(and(eq(modeEstimates.trackId, params.trackId), inArray(modeEstimates.windowId, rows.map((r) => r.id))));
  const natural = new Map<number, TrackWindowEstimate>();
  const forced = new Map<number, TrackWindowEstimate & { amplitude: number }>();
  for (const e of ests) {
    // An estimator without an interval gives a zero-width one: the rule then uses the point value.
    const te = {
      id: e.id,
      dampingPercent: e.dampingPercent,
      ciLow: e.dampingLo ?? e.dampingPercent,
      ciHigh: e.dampingHi ?? e.dampingPercent,
      frequencyHz: e.frequencyHz,
      forced: e.forced,
    };
    if (e.forced) {
      const prev = forced.get(e.windowId!);
      if (!prev || (e.amplitude ?? 0) > prev.amplitude) forced.set(e.windowId!, { ...te, amplitude: e.amplitude ?? 0 });
    } else if (!natural.has(e.windowId!)) natural.set(e.windowId!, te);
  }
  const out = rows.map((r) => {
    const f = forced.get(r.id);
    return {
      windowId: r.id,
      analysisId: r.analysisId,
      start: r.start.getTime() / 1000,
      end: r.end.getTime() / 1000,
      stepSeconds: stepOf(r.settings),
      skipped: (r.quality as { skipped?: unknown } | null)?.skipped === true,
      natural: natural.get(r.id) ?? null,
      forced: f ? { id: f.id, dampingPercent: f.dampingPercent, ciLow: f.ciLow, ciHigh: f.ciHigh, frequencyHz: f.frequencyHz, forced: true } : null,
    };
  });
  return out;
}

/** Earliest window start of an analysis (null when it has none). */
export async function firstWindowStart(db: DbOrTx, params: { analysisId: number }): Promise<Date | null> {
  const [row] = await db
    .select({ start: sql<Date | null>`min(${scanWindows.startTime})` })
    .from(scanWindows)
    .where(eq(scanWindows.analysisId, params.analysisId));
  return row?.start ? new Date(row.start) : null;
}

export async function alertsOfTrack(db: DbOrTx, params: { trackId: number; since?: Date | null }): Promise<AlertRow[]> {
  const conds: SQL[] = [eq(alerts.trackId, params.trackId)];
  // an alert still open, or cleared after `since`, may be touched by a replay from `since`
  if (params.since) conds.push(or(isNull(alerts.clearedAt), gt(alerts.clearedAt, params.since))!);
  return db.select().from(alerts).where(and(...conds)).orderBy(asc(alerts.openedAt));
}

/** Serialises alert evaluation of one track across workers, until the transaction ends. */
export async function lockTrackAlerts(db: DbOrTx, params: { trackId: number }): Promise<void> {
  // two-key advisory lock: a fixed namespace for alert evaluation and the track id
  await db.execute(sql`select pg_advisory_xact_lock(4711, ${params.trackId})`);
}

export async function insertAlert(db: DbOrTx, params: typeof alerts.$inferInsert): Promise<AlertRow> {
  const [row] = await db.insert(alerts).values(params).returning();
  return row;
}

export async function updateAlert(db: DbOrTx, params: { id: number; values: Partial<typeof alerts.$inferInsert> }): Promise<AlertRow | undefined> {
  const [row] = await db.update(alerts).set(params.values).where(eq(alerts.id, params.id)).returning();
  return row;
}

export async function getAlert(db: DbOrTx, params: { id: number }): Promise<AlertRow | undefined> {
  const [row] = await db.select().from(alerts).where(eq(alerts.id, params.id));
  return row;
}

export interface AlertWithTrack {
  alert: AlertRow;
  track: TrackRow;
  acknowledgedByName: string | null;
}

export async function listAlerts(
  db: DbOrTx,
  params: { state?: AlertStateValue; trackCode?: string; trackId?: number; notCleared?: boolean; limit?: number },
): Promise<AlertWithTrack[]> {
  const conds: SQL[] = [];
  if (params.state) conds.push(eq(alerts.state, params.state));
  if (params.trackCode) conds.push(eq(modeTracks.code, params.trackCode));
  if (params.trackId !== undefined) conds.push(eq(alerts.trackId, params.trackId));
  if (params.notCleared) conds.push(sql`${alerts.state} <> 'cleared'`);
  const rows = await db
    .select({ alert: alerts, track: modeTracks, ackName: people.displayName })
    .from(alerts)
    .innerJoin(modeTracks, eq(modeTracks.id, alerts.trackId))
    .leftJoin(people, eq(people.id, alerts.acknowledgedBy))
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(desc(alerts.openedAt), desc(alerts.id))
    .limit(params.limit ?? 100);
  return rows.map((r) => ({ alert: r.alert, track: r.track, acknowledgedByName: r.ackName }));
}

export async function getAlertWithTrack(db: DbOrTx, params: { id: number }): Promise<AlertWithTrack | undefined> {
  const [r] = await db
    .select({ alert: alerts, track: modeTracks, ackName: people.displayName })
    .from(alerts)
    .innerJoin(modeTracks, eq(modeTracks.id, alerts.trackId))
    .leftJoin(people, eq(people.id, alerts.acknowledgedBy))
    .where(eq(alerts.id, params.id));
  return r ? { alert: r.alert, track: r.track, acknowledgedByName: r.ackName } : undefined;
}

/** Locks the alert row for an acknowledgement (FOR UPDATE). */
export async function lockAlert(db: DbOrTx, params: { id: number }): Promise<AlertRow | undefined> {
  const [row] = await db.select().from(alerts).where(eq(alerts.id, params.id)).for('update');
  return row;
}

export type NotificationEvent = NotificationRow['event'];

/** People subscribed to a track, enabled accounts only. */
export async function subscribersOf(db: DbOrTx, params: { trackId: number }): Promise<{ id: number; email: string; displayName: string }[]> {
  return db
    .select({ id: people.id, email: people.email, displayName: people.displayName })
    .from(trackSubscriptions)
    .innerJoin(people, eq(people.id, trackSubscriptions.personId))
    .where(and(eq(trackSubscriptions.trackId, params.trackId), eq(people.disabled, false)))
    .orderBy(asc(people.id));
}

/** Records who is to be told of an event (once per alert, person and event). Returns the new rows. */
export async function addNotifications(
  db: DbOrTx,
  params: { alertId: number; event: NotificationEvent; personIds: number[] },
): Promise<NotificationRow[]> {
  if (params.personIds.length === 0) return [];
  return db
    .insert(alertNotifications)
    .values(params.personIds.map((personId) => ({ alertId: params.alertId, personId, event: params.event })))
    .onConflictDoNothing({ target: [alertNotifications.alertId, alertNotifications.personId, alertNotifications.event] })
    .returning();
}

/** Notifications of an event not yet handed to the mail queue, with the person. */
export async function pendingNotifications(
  db: DbOrTx,
  params: { alertId: number; event: NotificationEvent },
): Promise<{ id: number; personId: number; email: string; displayName: string }[]> {
  return db
    .select({ id: alertNotifications.id, personId: people.id, email: people.email, displayName: people.displayName })
    .from(alertNotifications)
    .innerJoin(people, eq(people.id, alertNotifications.personId))
    .where(and(eq(alertNotifications.alertId, params.alertId), eq(alertNotifications.event, params.event), isNull(alertNotifications.sentAt)))
    .orderBy(asc(alertNotifications.id));
}

export async function markNotificationSent(db: DbOrTx, params: { id: number; at?: Date }): Promise<void> {
  await db.update(alertNotifications).set({ sentAt: params.at ?? new Date() }).where(eq(alertNotifications.id, params.id));
}

export async function notificationsOf(
  db: DbOrTx,
  params: { alertId: number },
): Promise<{ personId: number; displayName: string; email: string; event: NotificationEvent; sentAt: Date | null }[]> {
  return db
    .select({
      personId: people.id,
      displayName: people.displayName,
      email: people.email,
      event: alertNotifications.event,
      sentAt: alertNotifications.sentAt,
    })
    .from(alertNotifications)
    .innerJoin(people, eq(people.id, alertNotifications.personId))
    .where(eq(alertNotifications.alertId, params.alertId))
    .orderBy(asc(alertNotifications.createdAt), asc(alertNotifications.id));
}

/** Audit entries whose target is this alert, oldest first. */
export async function alertHistory(
  db: DbOrTx,
  params: { alertId: number },
): Promise<{ at: Date; action: string; personId: number | null; displayName: string | null; details: Record<string, unknown> }[]> {
  return db
    .select({ at: auditLog.at, action: auditLog.action, personId: auditLog.personId, displayName: people.displayName, details: auditLog.details })
    .from(auditLog)
    .leftJoin(people, eq(people.id, auditLog.personId))
    .where(eq(auditLog.target, `alert:${params.alertId}`))
    .orderBy(asc(auditLog.at), asc(auditLog.id));
}

export async function getTrack(db: DbOrTx, params: { id?: number; code?: string }): Promise<TrackRow | undefined> {
  const where = params.id !== undefined ? eq(modeTracks.id, params.id) : eq(modeTracks.code, params.code ?? '');
  const [row] = await db.select().from(modeTracks).where(where);
  return row;
}

export async function listTracks(db: DbOrTx): Promise<TrackRow[]> {
  return db.select().from(modeTracks).orderBy(asc(modeTracks.id));
}
