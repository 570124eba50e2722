// The alert rule (server/alerts/rule.ts). The 3 % / 5 % thresholds are the common damping alert
// rule (common practice); everything else here is the rule as Keel defines it, so the windows are
// built by hand with known damping values and the expected events follow from the definitions.
import { describe, expect, it } from 'vitest';
import {
  AlertRuleSettingsError,
  DEFAULT_ALERT_RULE,
  checkAlertRuleSettings,
  classifyWindow,
  evaluateAlertRule,
  type RuleWindow,
} from './rule';

const T = { poorBelow: 3, lowBelow: 5 }; // common practice: the 3–5 % rule
const STEP = 60;
const WINDOW = 1200;
const T0 = 1_780_000_000;

/** One window per step from T0; each entry: [damping %, CI half-width] | 'forced' | 'skip' | null (no estimate). */
type Spec = [number, number] | 'forced' | 'skip' | null;
function windows(specs: Spec[], startIndex = 0, t0 = T0): RuleWindow[] {
  return specs.map((s, i) => {
    const start = t0 + (startIndex + i) * STEP;
    const w: RuleWindow = { start, end: start + WINDOW, stepSeconds: STEP, estimate: null };
    if (s === 'skip') w.skipped = true;
    else if (s === 'forced') w.estimate = { id: 1000 + i, dampingPercent: 0.4, ciLow: 0.1, ciHigh: 0.8, frequencyHz: 0.31, forced: true };
    else if (s) w.estimate = { id: 1000 + i, dampingPercent: s[0], ciLow: s[0] - s[1], ciHigh: s[0] + s[1], frequencyHz: 0.3, forced: false };
    return w;
  });
}
const poor: Spec = [2.2, 0.5]; // CI 1.7–2.7, wholly under 3 %
const good: Spec = [8, 1];
const low: Spec = [4, 0.5];
const repeat = (s: Spec, n: number): Spec[] => Array.from({ length: n }, () => s);

describe('classifyWindow', () => {
  it('uses the upper confidence bound for poor and the point estimate for the clear side', () => {
    const [a, b, c, d, e, f] = windows([[2.2, 0.5], [2.2, 1.0], [4.9, 0.1], [5, 2], 'forced', null]);
    expect(classifyWindow(a, T)).toEqual({ damping: 'poor', forced: 'none' });
    expect(classifyWindow(b, T).damping).toBe('between'); // upper bound 3.2 reaches out of the poor band
    expect(classifyWindow(c, T).damping).toBe('between');
    expect(classifyWindow(d, T).damping).toBe('good'); // 5.0 is the low-band edge, inclusive
    expect(classifyWindow(e, T)).toEqual({ damping: 'absent', forced: 'forced' });
    expect(classifyWindow(f, T)).toEqual({ damping: 'absent', forced: 'none' });
    expect(classifyWindow(windows(['skip'])[0], T)).toEqual({ damping: 'unknown', forced: 'unknown' });
  });

  it('judges a natural estimate beside a forced peak in the same window on its own damping', () => {
    const [w] = windows([poor]);
    w.forcedEstimate = { dampingPercent: 0.2, ciLow: 0, ciHigh: 0.5, frequencyHz: 0.4, forced: true };
    expect(classifyWindow(w, T)).toEqual({ damping: 'poor', forced: 'forced' });
  });
});

describe('evaluateAlertRule: opening', () => {
  it('opens a damping alert at the N-th consecutive poor window, not before', () => {
    const r2 = evaluateAlertRule(windows([good, poor, poor, good]), T);
    expect(r2.alerts).toHaveLength(0);
    const r = evaluateAlertRule(windows([good, poor, poor, poor, poor]), T);
    expect(r.alerts).toHaveLength(1);
    const a = r.alerts[0];
    expect(a.kind).toBe('poor');
    expect(a.openedWindowStart).toBe(T0 + 3 * STEP);
    expect(a.openedAt).toBe(T0 + 3 * STEP + WINDOW);
    expect(a.firstWindowStart).toBe(T0 + 1 * STEP);
    expect(a.level).toBe(1);
    expect(a.clearedAt).toBeNull();
    expect(a.windows).toBe(2);
    expect(r.transitions).toEqual([{ type: 'open', kind: 'poor', alert: 0, at: T0 + 3 * STEP + WINDOW }]);
  });

  it('does not open when only the point estimate is poor and the interval reaches the low band (noise alone)', () => {
    const r = evaluateAlertRule(windows(repeat([2.5, 1.2], 20)), T);
    expect(r.alerts).toHaveLength(0);
  });

  it('honours a custom N and per-track thresholds', () => {
    const settings = { ...DEFAULT_ALERT_RULE, openAfter: 5 };
    expect(evaluateAlertRule(windows(repeat(poor, 4)), T, settings).alerts).toHaveLength(0);
    expect(evaluateAlertRule(windows(repeat(poor, 5)), T, settings).alerts).toHaveLength(1);
    // 3.5 % ± 0.3 is poor under a 4 % / 6 % rule and not under 3 % / 5 %.
    const w = windows(repeat([3.5, 0.3], 3));
    expect(evaluateAlertRule(w, { poorBelow: 4, lowBelow: 6 }).alerts).toHaveLength(1);
    expect(evaluateAlertRule(w, T).alerts).toHaveLength(0);
  });

  it('sorts windows by start before folding', () => {
    const w = windows([poor, poor, poor]).reverse();
    const r = evaluateAlertRule(w, T);
    expect(r.alerts).toHaveLength(1);
    expect(r.alerts[0].openedWindowStart).toBe(T0 + 2 * STEP);
  });

  it('refuses two windows with the same start', () => {
    const w = windows([poor, poor]);
    w[1].start = w[0].start;
    expect(() => evaluateAlertRule(w, T)).toThrow(`evaluateAlertRule: two windows start at ${T0}; give one estimate per window`);
  });
});

describe('evaluateAlertRule: streak breakers', () => {
  it('a low-band, missing, skipped or forced window breaks the poor streak', () => {
    for (const breaker of [low, null, 'skip', 'forced'] as Spec[]) {
      const r = evaluateAlertRule(windows([poor, poor, breaker, poor, poor]), T);
      expect(r.alerts.filter((a) => a.kind === 'poor')).toHaveLength(0);
    }
  });

  it('a time gap longer than gapFactor × step breaks the streak', () => {
    const first = windows([poor, poor]);
    const later = windows([poor], 0, T0 + 3 * 3600); // three hours later
    expect(evaluateAlertRule([...first, ...later], T).alerts).toHaveLength(0);
    // Exactly 2 steps apart is still consecutive (a missed window between two scans, no gap).
    const near = windows([poor], 0, T0 + STEP + 2 * STEP);
    expect(evaluateAlertRule([...first, ...near], T).alerts).toHaveLength(1);
  });

  it('keeps an alert open across a gap and restarts only its counters', () => {
    const first = windows([poor, poor, poor, good, good]);
    const later = windows([good, good, good], 0, T0 + 5 * 3600);
    const r = evaluateAlertRule([...first, ...later], T);
    expect(r.alerts).toHaveLength(1);
    // the two good windows before the gap do not add up with the ones after it
    expect(r.alerts[0].clearedAt).toBe(T0 + 5 * 3600 + 2 * STEP + WINDOW);
  });
});

describe('evaluateAlertRule: escalation', () => {
  it("escalates ('persisted') when the mode stays poor for K further windows", () => {
    const settings = { ...DEFAULT_ALERT_RULE, escalateAfter: 4 };
    const notYet = evaluateAlertRule(windows(repeat(poor, 3 + 3)), T, settings);
    expect(notYet.alerts[0].level).toBe(1);
    const r = evaluateAlertRule(windows(repeat(poor, 3 + 4)), T, settings);
    const a = r.alerts[0];
    expect(a.level).toBe(2);
    expect(a.escalationReason).toBe('persisted');
    expect(a.escalatedAt).toBe(T0 + 6 * STEP + WINDOW);
    expect(r.transitions.map((t) => t.type)).toEqual(['open', 'escalate']);
  });

  it('the K further windows must be consecutive: a low-band window restarts the count', () => {
    const settings = { ...DEFAULT_ALERT_RULE, escalateAfter: 4 };
    const r = evaluateAlertRule(windows([...repeat(poor, 3), poor, poor, poor, low, poor, poor, poor]), T, settings);
    expect(r.alerts[0].level).toBe(1);
  });

  it("escalates ('deep') as soon as a poor window's upper bound is under half the poor threshold", () => {
    const r = evaluateAlertRule(windows([poor, poor, poor, poor, [1.0, 0.4], poor]), T);
    const a = r.alerts[0];
    expect(a.level).toBe(2);
    expect(a.escalationReason).toBe('deep');
    expect(a.escalatedAt).toBe(T0 + 4 * STEP + WINDOW);
    expect(a.worstDampingPercent).toBe(1.0);
    expect(a.worstWindowStart).toBe(T0 + 4 * STEP);
    expect(a.worstEstimateId).toBe(1004);
    // an explicit level: 0.9 % upper bound escalates only under a 1 % setting, not 0.5 %
    const w = windows([poor, poor, poor, [0.6, 0.3]]);
    expect(evaluateAlertRule(w, T, { ...DEFAULT_ALERT_RULE, escalateBelow: 1 }).alerts[0].level).toBe(2);
    expect(evaluateAlertRule(w, T, { ...DEFAULT_ALERT_RULE, escalateBelow: 0.5 }).alerts[0].level).toBe(1);
  });

  it('can open and escalate on the same window, and escalates only once', () => {
    const deep: Spec = [0.8, 0.3];
    const r = evaluateAlertRule(windows(repeat(deep, 20)), T);
    expect(r.transitions.map((t) => `${t.type}@${t.at}`)).toEqual([`open@${T0 + 2 * STEP + WINDOW}`, `escalate@${T0 + 2 * STEP + WINDOW}`]);
  });
});

describe('evaluateAlertRule: clearing (hysteresis)', () => {
  it('clears after M consecutive windows at or above the low-band edge', () => {
    const r = evaluateAlertRule(windows([...repeat(poor, 3), good, good, good, good]), T);
    expect(r.alerts[0].clearedAt).toBe(T0 + 5 * STEP + WINDOW);
    expect(r.transitions.map((t) => t.type)).toEqual(['open', 'clear']);
    expect(r.alerts[0].windows).toBe(4); // opening window + 3 good ones
  });

  it('does not clear while damping sits in the low band (3–5 %), however long', () => {
    const r = evaluateAlertRule(windows([...repeat(poor, 3), ...repeat(low, 50)]), T);
    expect(r.alerts[0].clearedAt).toBeNull();
  });

  it('a low-band, missing or forced window restarts the clear count', () => {
    for (const breaker of [low, null, 'forced', 'skip'] as Spec[]) {
      const r = evaluateAlertRule(windows([...repeat(poor, 3), good, good, breaker, good, good]), T);
      const a = r.alerts.find((x) => x.kind === 'poor')!;
      expect(a.clearedAt).toBeNull();
    }
  });

  it('a cleared alert can open again as a new alert', () => {
    const r = evaluateAlertRule(windows([...repeat(poor, 3), ...repeat(good, 3), ...repeat(poor, 3)]), T);
    expect(r.alerts).toHaveLength(2);
    expect(r.alerts[0].clearedAt).not.toBeNull();
    expect(r.alerts[1].clearedAt).toBeNull();
    expect(r.alerts[1].openedWindowStart).toBe(T0 + 8 * STEP);
    expect(r.transitions.map((t) => `${t.type}:${t.alert}`)).toEqual(['open:0', 'clear:0', 'open:1']);
  });

  it('the clear count M is a setting', () => {
    const settings = { ...DEFAULT_ALERT_RULE, clearAfter: 5 };
    expect(evaluateAlertRule(windows([...repeat(poor, 3), ...repeat(good, 4)]), T, settings).alerts[0].clearedAt).toBeNull();
    expect(evaluateAlertRule(windows([...repeat(poor, 3), ...repeat(good, 5)]), T, settings).alerts[0].clearedAt).not.toBeNull();
  });
});

describe('evaluateAlertRule: forced oscillations', () => {
  it('are never counted as poor damping, and raise their own alert kind', () => {
    const r = evaluateAlertRule(windows(repeat('forced', 6)), T);
    expect(r.alerts.map((a) => a.kind)).toEqual(['forced']);
    const a = r.alerts[0];
    expect(a.openedWindowStart).toBe(T0 + 2 * STEP);
    expect(a.worstDampingPercent).toBeNull();
    expect(a.frequencyHz).toBe(0.31);
  });

  it('a forced alert clears after the forced peak is gone for M windows (a natural estimate or none)', () => {
    const r = evaluateAlertRule(windows([...repeat('forced', 3), good, null, 'skip', low, 'forced', good, null, good]), T);
    const a = r.alerts[0];
    // good and null count (2); the skipped window restarts the count; low counts (1); forced
    // restarts it; then good, null, good make three and clear it.
    expect(a.clearedAt).toBe(T0 + 10 * STEP + WINDOW);
  });

  it('a natural poor mode beside a forced peak opens both kinds', () => {
    const w = windows(repeat(poor, 4));
    for (const x of w) x.forcedEstimate = { dampingPercent: 0.2, ciLow: 0, ciHigh: 0.5, frequencyHz: 0.41, forced: true };
    const r = evaluateAlertRule(w, T);
    expect(r.alerts.map((a) => a.kind).sort()).toEqual(['forced', 'poor']);
    expect(r.alerts.find((a) => a.kind === 'poor')!.worstDampingPercent).toBe(2.2);
    expect(r.alerts.find((a) => a.kind === 'forced')!.frequencyHz).toBe(0.41);
  });

  it('damping and forced alerts are independent', () => {
    const r = evaluateAlertRule(windows([...repeat(poor, 3), ...repeat('forced', 3), ...repeat(poor, 1)]), T);
    expect(r.alerts.map((a) => `${a.kind}:${a.clearedAt === null ? 'open' : 'cleared'}`)).toEqual(['poor:open', 'forced:open']);
  });
});

describe('evaluateAlertRule: replay from a quiet window gives the same alerts', () => {
  it('alerts opened after a quiet window are identical whether or not the earlier history is replayed', () => {
    // A pseudo-random history (fixed seed LCG) of poor / low / good / forced / missing windows.
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const specs: Spec[] = [];
    let regime = 0;
    for (let i = 0; i < 600; i++) {
      if (rnd() < 0.05) regime = Math.floor(rnd() * 4);
      const r = rnd();
      if (r < 0.02) specs.push(null);
      else if (r < 0.03) specs.push('skip');
      else if (regime === 3 && r < 0.5) specs.push('forced');
      else if (regime === 0) specs.push(poor);
      else if (regime === 1) specs.push(low);
      else specs.push(good);
    }
    const all = windows(specs);
    const full = evaluateAlertRule(all, T);
    expect(full.alerts.length).toBeGreaterThan(3);
    // Quiet windows: after them no alert of either kind is open and the window was neither poor nor forced.
    const key = (a: { kind: string; openedWindowStart: number; level: number; clearedAt: number | null; escalatedAt: number | null }) =>
      `${a.kind}@${a.openedWindowStart}/${a.level}/${a.escalatedAt}/${a.clearedAt}`;
    let checked = 0;
    for (let q = 50; q < all.length - 50; q += 37) {
      const qs = all[q].start;
      const openAtQ = full.alerts.some((a) => a.openedWindowStart <= qs && (a.clearedAt === null || a.clearedAt > all[q].end));
      const c = classifyWindow(all[q], T);
      if (openAtQ || c.damping === 'poor' || c.forced === 'forced') continue;
      const tail = evaluateAlertRule(all.slice(q + 1), T);
      const expected = full.alerts.filter((a) => a.openedWindowStart > qs).map(key);
      expect(tail.alerts.map(key)).toEqual(expected);
      checked++;
    }
    expect(checked).toBeGreaterThan(3);
  });
});

describe('checkAlertRuleSettings', () => {
  const msg = (s: Partial<typeof DEFAULT_ALERT_RULE>, t = T) => {
    try {
      checkAlertRuleSettings({ ...DEFAULT_ALERT_RULE, ...s }, t);
      return 'ok';
    } catch (e) {
      expect(e).toBeInstanceOf(AlertRuleSettingsError);
      return (e as Error).message;
    }
  };
  it('accepts the defaults', () => expect(msg({})).toBe('ok'));
  it('names each bad value', () => {
    expect(msg({ openAfter: 0 })).toBe('openAfter must be a whole number of windows from 1 to 10000 (got 0)');
    expect(msg({ clearAfter: 2.5 })).toBe('clearAfter must be a whole number of windows from 1 to 10000 (got 2.5)');
    expect(msg({ gapFactor: 0.5 })).toBe('gapFactor must be a number of at least 1 (got 0.5)');
    expect(msg({ escalateBelow: 3 })).toBe('escalateBelow must be a damping percentage under poorBelow (3 %) (got 3)');
    expect(msg({}, { poorBelow: 5, lowBelow: 5 })).toBe('lowBelow (5 %) must be above poorBelow (5 %)');
    expect(msg({}, { poorBelow: 0, lowBelow: 5 })).toBe('poorBelow must be a positive damping percentage (got 0)');
  });
});
