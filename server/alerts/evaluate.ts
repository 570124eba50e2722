// Alert evaluation of one track against the stored estimates: replays the rule (./rule.ts) from a
// quiet window — one after which the rule's state is known to be empty: no alert of the track
// open there (by the stored alerts), and the window neither poor nor holding a forced peak — to
// the newest window, then reconciles the result with the stored alerts. Re-running it changes
// nothing (idempotent), so a retried or duplicated evaluation job is harmless.
//
// Runs in one transaction under a per-track advisory lock, so two workers never evaluate the same
// track at once. New transitions (open / escalate / clear) are written to the audit log and to
// alert_notifications for every subscriber of the track; the caller sends the e-mails and the live
// events after the commit.
import type { Db, DbOrTx } from '../../db/client';
import {
  addNotifications,
  alertsOfTrack,
  firstWindowStart,
  getTrack,
  insertAlert,
  lockTrackAlerts,
  subscribersOf,
  trackWindows,
  updateAlert,
  type AlertRow,
  type TrackWindow,
} from '../../db/queries/alerts';
import { recordAudit } from '../../db/queries/audit';
import { classifyWindow, DEFAULT_ALERT_RULE, evaluateAlertRule, type AlertRuleSettings, type RuleAlert, type RuleWindow } from './rule';

export type NotificationEventName = 'opened' | 'escalated' | 'cleared';

export interface StoredTransition {
  alertId: number;
  trackId: number;
  trackCode: string;
  trackName: string;
  kind: 'poor' | 'forced';
  event: NotificationEventName;
  level: number;
  worstDamping: number | null;
  /** When the rule's evidence for the change was complete. */
  at: Date;
  reason: string | null;
}

const EVENT_OF = { open: 'opened', escalate: 'escalated', clear: 'cleared' } as const;

function toRuleWindow(w: TrackWindow): RuleWindow {
  return {
    start: w.start,
    end: w.end,
    stepSeconds: w.stepSeconds,
    skipped: w.skipped,
    estimate: w.natural,
    forcedEstimate: w.forced,
  };
}

const sec = (d: Date) => d.getTime() / 1000;
const date = (s: number) => new Date(Math.round(s * 1000));

function openAt(a: AlertRow, t: number): boolean {
  return sec(a.openedAt) <= t && (a.clearedAt === null || sec(a.clearedAt) > t);
}

/** The latest window before `before` after which the rule's state is empty; null: replay everything. */
async function quietPoint(
  db: DbOrTx,
  trackId: number,
  before: Date,
  thresholds: { poorBelow: number; lowBelow: number },
  stored: AlertRow[],
): Promise<Date | null> {
  let cursor = before;
  for (;;) {
    const page = await trackWindows(db, { trackId, before: cursor, limit: 200, descending: true });
    if (page.length === 0) return null;
    for (const w of page) {
      const c = classifyWindow(toRuleWindow(w), thresholds);
      if (c.damping === 'poor' || c.forced === 'forced') continue;
      if (stored.some((a) => openAt(a, w.end))) continue;
      return date(w.start);
    }
    cursor = date(page[page.length - 1].start);
  }
}

function overlaps(a: AlertRow, r: RuleAlert): boolean {
  const aFrom = sec(a.openedAt);
  const aTo = a.clearedAt ? sec(a.clearedAt) : Infinity;
  const rTo = r.clearedAt ?? Infinity;
  return aFrom <= rTo && aTo >= r.openedAt;
}

export interface EvaluateOptions {
  trackId: number;
  /** Evaluate after this scan stored its windows (replay from its first window); omit: whole history. */
  analysisId?: number;
  settings?: AlertRuleSettings;
}

export async function evaluateTrackAlerts(db: Db, opts: EvaluateOptions): Promise<StoredTransition[]> {
  return db.transaction(async (tx) => {
    await lockTrackAlerts(tx, { trackId: opts.trackId });
    const track = await getTrack(tx, { id: opts.trackId });
    if (!track) return [];
    const thresholds = { poorBelow: track.poorBelow, lowBelow: track.lowBelow };
    const stored = await alertsOfTrack(tx, { trackId: track.id });

    // Replay from before the new windows and before every alert still open.
    let bound: Date | null = null;
    let whole = opts.analysisId === undefined;
    if (opts.analysisId !== undefined) {
      bound = await firstWindowStart(tx, { analysisId: opts.analysisId });
      if (!bound) return [];
    }
    for (const a of stored) if (a.clearedAt === null && bound && a.openedAt < bound) bound = a.openedAt;
    const after = whole || !bound ? null : await quietPoint(tx, track.id, bound, thresholds, stored);
    if (after === null) whole = true;

    const windows = await trackWindows(tx, { trackId: track.id, after });
    const result = evaluateAlertRule(windows.map(toRuleWindow), thresholds, opts.settings ?? DEFAULT_ALERT_RULE);

    const candidates = stored.filter((a) => whole || !after || a.clearedAt === null || a.clearedAt > after);
    const matched = new Set<number>();
    const rowOf: AlertRow[] = [];
    const isNew = new Map<string, boolean>(); // `${alertIndex}:${type}` → new transition
    for (let i = 0; i < result.alerts.length; i++) {
      const ra = result.alerts[i];
      const match = candidates.find((a) => !matched.has(a.id) && a.kind === ra.kind && overlaps(a, ra));
      const values = {
        trackId: track.id,
        kind: ra.kind,
        level: ra.level,
        openedAt: date(ra.openedAt),
        escalatedAt: ra.escalatedAt === null ? null : date(ra.escalatedAt),
        clearedAt: ra.clearedAt === null ? null : date(ra.clearedAt),
        worstDamping: ra.worstDampingPercent,
        worstEstimateId: ra.worstEstimateId,
      };
      if (!match) {
        const row = await insertAlert(tx, { ...values, state: ra.clearedAt !== null ? 'cleared' : 'open' });
        rowOf.push(row);
        isNew.set(`${i}:open`, true);
        isNew.set(`${i}:escalate`, true);
        isNew.set(`${i}:clear`, true);
        continue;
      }
      matched.add(match.id);
      const newEscalation = ra.escalatedAt !== null && match.escalatedAt === null;
      const newClear = ra.clearedAt !== null && match.clearedAt === null;
      // An escalation asks for a new look: an acknowledged alert is open again (its note is kept).
      const state = ra.clearedAt !== null ? 'cleared' : newEscalation ? 'open' : match.state === 'cleared' ? 'open' : match.state;
      const changed =
        match.level !== values.level ||
        match.openedAt.getTime() !== values.openedAt.getTime() ||
        (match.escalatedAt?.getTime() ?? null) !== (values.escalatedAt?.getTime() ?? null) ||
        (match.clearedAt?.getTime() ?? null) !== (values.clearedAt?.getTime() ?? null) ||
        match.worstDamping !== values.worstDamping ||
        match.worstEstimateId !== values.worstEstimateId ||
        match.state !== state;
      rowOf.push(changed ? ((await updateAlert(tx, { id: match.id, values: { ...values, state } })) ?? match) : match);
      isNew.set(`${i}:escalate`, newEscalation);
      isNew.set(`${i}:clear`, newClear);
    }

    const out: StoredTransition[] = [];
    const subscribers = result.transitions.length ? await subscribersOf(tx, { trackId: track.id }) : [];
    for (const t of result.transitions) {
      if (!isNew.get(`${t.alert}:${t.type}`)) continue;
      const row = rowOf[t.alert];
      const ra = result.alerts[t.alert];
      const event = EVENT_OF[t.type];
      const st: StoredTransition = {
        alertId: row.id,
        trackId: track.id,
        trackCode: track.code,
        trackName: track.name,
        kind: ra.kind,
        event,
        level: t.type === 'open' ? 1 : row.level,
        worstDamping: ra.worstDampingPercent,
        at: date(t.at),
        reason: t.reason ?? null,
      };
      await recordAudit(tx, {
        personId: null,
        action: `alert.${event}`,
        target: `alert:${row.id}`,
        details: {
          track: track.code,
          kind: ra.kind,
          level: st.level,
          at: st.at.toISOString(),
          worstDamping: ra.worstDampingPercent,
          ...(t.reason ? { reason: t.reason } : {}),
          rule: { poorBelow: track.poorBelow, lowBelow: track.lowBelow },
        },
      });
      await addNotifications(tx, { alertId: row.id, event, personIds: subscribers.map((p) => p.id) });
      out.push(st);
    }
    return out;
  });
}
