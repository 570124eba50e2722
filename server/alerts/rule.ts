// The alert rule of a mode track, as a pure fold over the track's scan windows in time order.
//
// Two independent alert kinds per track:
//
//  'poor' — the mode is poorly damped (damping alert).
//    A window is POOR when the UPPER bound of the damping confidence interval is below the track's
//    poorBelow (so a noisy estimate whose interval reaches into the low band does not count).
//    OPEN      after `openAfter` (N, default 3) consecutive poor windows; opened at the N-th.
//    ESCALATE  once per alert (level 1 → 2), at the first of:
//                - 'persisted': the mode stays poor for a further `escalateAfter` (K, default 10)
//                  consecutive windows after the opening window;
//                - 'deep': the upper bound of one poor window falls below `escalateBelow`
//                  (default: half of the track's poorBelow, i.e. 1.5 % for the 3 % rule).
//    CLEAR     after `clearAfter` (M, default 3) consecutive windows whose damping estimate (the point
//              value) is at or above the track's lowBelow — the low-band edge, not the poor edge,
//              so an estimate hovering around poorBelow does not open and close the alert
//              repeatedly (hysteresis).
//  'forced' — a sustained forced oscillation in the track's band.
//    OPEN  after `forcedOpenAfter` consecutive windows with a forced-oscillation estimate in the band.
//    CLEAR after `forcedClearAfter` consecutive windows without one (a natural mode estimate only,
//          or no peak in the band at all).
//    A forced estimate is never counted as poor damping. The damping kind looks only at the
//    window's natural-mode estimate; a window that has none (only a forced peak, or nothing) breaks
//    its poor and clear streaks alike (the natural mode was not measured).
//
// "Consecutive" means consecutive scan windows of the track: a skipped window (too many missing
// samples) and a window with no estimate in the band break the damping streaks, and so does a time
// gap between two windows longer than `gapFactor` × the scan step (e.g. two recordings hours apart).
// An open alert stays open across gaps; only its counters restart.
//
// Time stamps: an estimate is known at its window's END, so events carry window ends; windows are
// ordered and identified by their start.
import type { BandThresholds } from '../../shared/bands';

export type AlertKind = 'poor' | 'forced';
export type AlertTransitionType = 'open' | 'escalate' | 'clear';
export type EscalationReason = 'persisted' | 'deep';

export interface AlertRuleSettings {
  /** N: consecutive poor windows that open a damping alert. */
  openAfter: number;
  /** K: further consecutive poor windows after the opening one that escalate it. */
  escalateAfter: number;
  /** Damping percent; a poor window whose CI upper bound is below this escalates at once. null: poorBelow / 2. */
  escalateBelow: number | null;
  /** M: consecutive windows with damping ≥ lowBelow that clear a damping alert. */
  clearAfter: number;
  /** Consecutive forced windows that open a forced-oscillation alert. */
  forcedOpenAfter: number;
  /** Consecutive windows without a forced estimate that clear it. */
  forcedClearAfter: number;
  /** Two windows further apart than gapFactor × step are not consecutive. */
  gapFactor: number;
}

export const DEFAULT_ALERT_RULE: AlertRuleSettings = {
  openAfter: 3,
  escalateAfter: 10,
  escalateBelow: null,
  clearAfter: 3,
  forcedOpenAfter: 3,
  forcedClearAfter: 3,
  gapFactor: 2,
};

export class AlertRuleSettingsError extends Error {
  readonly code = 'ALERT_RULE_SETTINGS' as const;
  constructor(message: string) {
    super(message);
    this.name = 'AlertRuleSettingsError';
  }
}

/** The one check of rule settings and thresholds; messages name the offending value. */
export function checkAlertRuleSettings(settings: AlertRuleSettings, thresholds: BandThresholds): void {
  const counts: (keyof AlertRuleSettings)[] = ['openAfter', 'escalateAfter', 'clearAfter', 'forcedOpenAfter', 'forcedClearAfter'];
  for (const k of counts) {
    const v = settings[k] as number;
    if (!Number.isInteger(v) || v < 1 || v > 10_000) {
      throw new AlertRuleSettingsError(`${k} must be a whole number of windows from 1 to 10000 (got ${v})`);
    }
  }
  if (!Number.isFinite(settings.gapFactor) || settings.gapFactor < 1) {
    throw new AlertRuleSettingsError(`gapFactor must be a number of at least 1 (got ${settings.gapFactor})`);
  }
  if (!Number.isFinite(thresholds.poorBelow) || !Number.isFinite(thresholds.lowBelow) || thresholds.poorBelow <= 0) {
    throw new AlertRuleSettingsError(`poorBelow must be a positive damping percentage (got ${thresholds.poorBelow})`);
  }
  if (!(thresholds.lowBelow > thresholds.poorBelow)) {
    throw new AlertRuleSettingsError(`lowBelow (${thresholds.lowBelow} %) must be above poorBelow (${thresholds.poorBelow} %)`);
  }
  if (settings.escalateBelow !== null) {
    if (!Number.isFinite(settings.escalateBelow) || settings.escalateBelow >= thresholds.poorBelow) {
      throw new AlertRuleSettingsError(
        `escalateBelow must be a damping percentage under poorBelow (${thresholds.poorBelow} %) (got ${settings.escalateBelow})`,
      );
    }
  }
}

/** An estimate of the track in one scan window. */
export interface RuleEstimate {
  /** Id of the stored mode estimate, carried through to the alert's worst window. */
  id?: number;
  dampingPercent: number;
  /** Confidence interval of the damping, percent. */
  ciLow: number;
  ciHigh: number;
  frequencyHz: number;
  forced: boolean;
}

export interface RuleWindow {
  /** Epoch seconds of the window start and end. */
  start: number;
  end: number;
  /** The scan step of the window's analysis, seconds (gap detection). */
  stepSeconds: number;
  /** The window was not estimated (data quality). */
  skipped?: boolean;
  /**
   * The track's natural-mode estimate in the window (at most one), or null. An estimate flagged
   * forced given here is treated as `forcedEstimate` instead (and the window has no natural one).
   */
  estimate: RuleEstimate | null;
  /** A forced-oscillation estimate in the track's band, or null. */
  forcedEstimate?: RuleEstimate | null;
}

export interface RuleAlert {
  kind: AlertKind;
  /** Window start of the window at which the alert opened: the alert's identity within its track. */
  openedWindowStart: number;
  /** Window end of that window (the time the evidence was complete). */
  openedAt: number;
  /** Start of the first window of the streak that opened it. */
  firstWindowStart: number;
  level: 1 | 2;
  escalatedAt: number | null;
  escalationReason: EscalationReason | null;
  clearedAt: number | null;
  /** Lowest damping point estimate while open (damping alerts), with its window and CI. */
  worstDampingPercent: number | null;
  worstCiLow: number | null;
  worstCiHigh: number | null;
  worstWindowStart: number | null;
  worstEstimateId: number | null;
  /** Frequency of the latest estimate that counted for the alert, Hz. */
  frequencyHz: number | null;
  /** Scan windows seen while the alert was open (the opening window included). */
  windows: number;
}

export interface RuleTransition {
  type: AlertTransitionType;
  kind: AlertKind;
  /** Index into `alerts`. */
  alert: number;
  /** Window end at which it happened, epoch seconds. */
  at: number;
  reason?: EscalationReason;
}

export type DampingClass = 'unknown' | 'absent' | 'poor' | 'between' | 'good';
export type ForcedClass = 'unknown' | 'forced' | 'none';
export interface WindowClass {
  damping: DampingClass;
  forced: ForcedClass;
}

function naturalOf(w: RuleWindow): RuleEstimate | null {
  return w.estimate && !w.estimate.forced ? w.estimate : null;
}
function forcedOf(w: RuleWindow): RuleEstimate | null {
  if (w.forcedEstimate) return w.forcedEstimate;
  return w.estimate && w.estimate.forced ? w.estimate : null;
}

/** How the rule sees one window, before streaks. */
export function classifyWindow(w: RuleWindow, thresholds: BandThresholds): WindowClass {
  if (w.skipped) return { damping: 'unknown', forced: 'unknown' };
  const forced: ForcedClass = forcedOf(w) ? 'forced' : 'none';
  const e = naturalOf(w);
  if (!e) return { damping: 'absent', forced };
  if (e.ciHigh < thresholds.poorBelow) return { damping: 'poor', forced };
  if (e.dampingPercent >= thresholds.lowBelow) return { damping: 'good', forced };
  return { damping: 'between', forced };
}

export interface RuleState {
  lastStart: number | null;
  poorStreak: number;
  streakStart: number | null;
  /** Consecutive poor windows after the opening one (escalation). */
  poorSinceOpen: number;
  goodStreak: number;
  forcedStreak: number;
  forcedStreakStart: number | null;
  notForcedStreak: number;
  openDamping: number | null;
  openForced: number | null;
}

export function initialRuleState(): RuleState {
  return {
    lastStart: null,
    poorStreak: 0,
    streakStart: null,
    poorSinceOpen: 0,
    goodStreak: 0,
    forcedStreak: 0,
    forcedStreakStart: null,
    notForcedStreak: 0,
    openDamping: null,
    openForced: null,
  };
}

export interface RuleResult {
  alerts: RuleAlert[];
  transitions: RuleTransition[];
  state: RuleState;
}

function newAlert(kind: AlertKind, w: RuleWindow, firstStart: number): RuleAlert {
  return {
    kind,
    openedWindowStart: w.start,
    openedAt: w.end,
    firstWindowStart: firstStart,
    level: 1,
    escalatedAt: null,
    escalationReason: null,
    clearedAt: null,
    worstDampingPercent: null,
    worstCiLow: null,
    worstCiHigh: null,
    worstWindowStart: null,
    worstEstimateId: null,
    frequencyHz: (kind === 'forced' ? forcedOf(w) : naturalOf(w))?.frequencyHz ?? null,
    windows: 0,
  };
}

function noteWorst(a: RuleAlert, w: RuleWindow): void {
  const e = naturalOf(w);
  if (!e) return;
  if (a.worstDampingPercent === null || e.dampingPercent < a.worstDampingPercent) {
    a.worstDampingPercent = e.dampingPercent;
    a.worstCiLow = e.ciLow;
    a.worstCiHigh = e.ciHigh;
    a.worstWindowStart = w.start;
    a.worstEstimateId = e.id ?? null;
  }
}

/**
 * Runs the rule over windows (sorted here by start; two windows with the same start are an error of
 * the caller) from the quiet state: nothing open, no streaks. The caller replays from a window after
 * which that holds (see db/queries/alerts.ts), so the result is a pure function of the estimates and
 * re-running it is idempotent. Returns every alert that was open at some point — the ones still open
 * at the end have clearedAt null — and the transitions in time order.
 */
export function evaluateAlertRule(
  windows: readonly RuleWindow[],
  thresholds: BandThresholds,
  settings: AlertRuleSettings = DEFAULT_ALERT_RULE,
): RuleResult {
  checkAlertRuleSettings(settings, thresholds);
  const escalateBelow = settings.escalateBelow ?? thresholds.poorBelow / 2;
  const s: RuleState = initialRuleState();
  const alerts: RuleAlert[] = [];
  const transitions: RuleTransition[] = [];
  const sorted = [...windows].sort((a, b) => a.start - b.start);

  for (let i = 0; i < sorted.length; i++) {
    const w = sorted[i];
    if (s.lastStart !== null && w.start === s.lastStart) {
      throw new Error(`evaluateAlertRule: two windows start at ${w.start}; give one estimate per window`);
    }
    if (s.lastStart !== null && w.start - s.lastStart > settings.gapFactor * w.stepSeconds) {
      s.poorStreak = 0;
      s.streakStart = null;
      s.poorSinceOpen = 0;
      s.goodStreak = 0;
      s.forcedStreak = 0;
      s.forcedStreakStart = null;
      s.notForcedStreak = 0;
    }
    s.lastStart = w.start;
    const cls = classifyWindow(w, thresholds);
    const c = cls.damping;
    const natural = naturalOf(w);

    // --- damping kind ---
    if (c === 'poor') {
      if (s.poorStreak === 0) s.streakStart = w.start;
      s.poorStreak++;
    } else {
      s.poorStreak = 0;
      s.streakStart = null;
    }
    if (s.openDamping === null) {
      s.goodStreak = 0;
      if (s.poorStreak >= settings.openAfter) {
        const a = newAlert('poor', w, s.streakStart ?? w.start);
        alerts.push(a);
        s.openDamping = alerts.length - 1;
        s.poorSinceOpen = 0;
        a.windows = 1;
        // The streak that opened the alert is its evidence: its windows count towards the worst.
        for (let k = i - s.poorStreak + 1; k <= i; k++) noteWorst(a, sorted[k]);
        transitions.push({ type: 'open', kind: 'poor', alert: s.openDamping, at: w.end });
        if (natural && natural.ciHigh < escalateBelow) {
          a.level = 2;
          a.escalatedAt = w.end;
          a.escalationReason = 'deep';
          transitions.push({ type: 'escalate', kind: 'poor', alert: s.openDamping, at: w.end, reason: 'deep' });
        }
      }
    } else {
      const a = alerts[s.openDamping];
      a.windows++;
      noteWorst(a, w);
      if (natural) a.frequencyHz = natural.frequencyHz;
      s.poorSinceOpen = c === 'poor' ? s.poorSinceOpen + 1 : 0;
      if (a.level === 1 && c === 'poor') {
        const reason: EscalationReason | null =
          natural!.ciHigh < escalateBelow ? 'deep' : s.poorSinceOpen >= settings.escalateAfter ? 'persisted' : null;
        if (reason) {
          a.level = 2;
          a.escalatedAt = w.end;
          a.escalationReason = reason;
          transitions.push({ type: 'escalate', kind: 'poor', alert: s.openDamping, at: w.end, reason });
        }
      }
      s.goodStreak = c === 'good' ? s.goodStreak + 1 : 0;
      if (s.goodStreak >= settings.clearAfter) {
        a.clearedAt = w.end;
        transitions.push({ type: 'clear', kind: 'poor', alert: s.openDamping, at: w.end });
        s.openDamping = null;
        s.goodStreak = 0;
        s.poorSinceOpen = 0;
      }
    }

    // --- forced kind ---
    const f = cls.forced;
    if (f === 'forced') {
      if (s.forcedStreak === 0) s.forcedStreakStart = w.start;
      s.forcedStreak++;
    } else {
      s.forcedStreak = 0;
      s.forcedStreakStart = null;
    }
    if (s.openForced === null) {
      s.notForcedStreak = 0;
      if (s.forcedStreak >= settings.forcedOpenAfter) {
        const a = newAlert('forced', w, s.forcedStreakStart ?? w.start);
        a.windows = 1;
        alerts.push(a);
        s.openForced = alerts.length - 1;
        transitions.push({ type: 'open', kind: 'forced', alert: s.openForced, at: w.end });
      }
    } else {
      const a = alerts[s.openForced];
      a.windows++;
      if (f === 'forced') a.frequencyHz = forcedOf(w)!.frequencyHz;
      // A skipped window says nothing either way; any other window without a forced peak counts.
      s.notForcedStreak = f === 'none' ? s.notForcedStreak + 1 : 0;
      if (s.notForcedStreak >= settings.forcedClearAfter) {
        a.clearedAt = w.end;
        transitions.push({ type: 'clear', kind: 'forced', alert: s.openForced, at: w.end });
        s.openForced = null;
        s.notForcedStreak = 0;
      }
    }
  }
  return { alerts, transitions, state: s };
}
