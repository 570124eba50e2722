import { describe, expect, it } from 'vitest';
import { emailJobSchema } from '../../jobs/queues';
import { alertEmail } from './email';

const base = {
  to: 'operator@tarrow.example',
  displayName: 'Demo Operator',
  alertId: 12,
  level: 1,
  trackName: 'North–south',
  poorBelow: 3,
  lowBelow: 5,
  worstDamping: 2.14,
  openedAt: new Date('2025-04-01T00:22:00Z'),
  escalatedAt: null,
  clearedAt: null,
  appUrl: 'https://keel.tarrow.example',
};

describe('alertEmail', () => {
  it('says what happened, the worst damping, and links the alert', () => {
    const m = alertEmail({ ...base, event: 'opened', kind: 'poor' });
    expect(emailJobSchema.parse(m)).toEqual(m); // a valid e-mail job
    expect(m.kind).toBe('alert');
    expect(m.subject).toBe('[Keel] Alert opened: North–south — poorly damped mode');
    expect(m.text).toContain('Lowest damping while open: 2.1 %');
    expect(m.text).toContain('Opened: 2025-04-01 00:22:00 UTC');
    expect(m.text).toContain('https://keel.tarrow.example/alerts/12');
    expect(m.text).toMatch(/advisory/i);
    expect(m.html).toContain('href="https://keel.tarrow.example/alerts/12"');
  });
  it('has its own wording for escalations, clearing and forced oscillations', () => {
    expect(alertEmail({ ...base, event: 'escalated', kind: 'poor', level: 2, escalatedAt: new Date('2025-04-01T00:40:00Z') }).text).toContain(
      'Escalated: 2025-04-01 00:40:00 UTC',
    );
    const cleared = alertEmail({ ...base, event: 'cleared', kind: 'poor', clearedAt: new Date('2025-04-01T03:22:00Z') });
    expect(cleared.subject).toBe('[Keel] Alert cleared: North–south — poorly damped mode');
    expect(cleared.text).toContain('damped at 5 % or more again');
    const forced = alertEmail({ ...base, event: 'opened', kind: 'forced', worstDamping: null });
    expect(forced.subject).toBe('[Keel] Alert opened: North–south — forced oscillation');
    expect(forced.text).toContain('not counted as poor damping');
    expect(forced.text).not.toContain('Lowest damping');
  });
  it('escapes HTML in names', () => {
    expect(alertEmail({ ...base, event: 'opened', kind: 'poor', trackName: 'A <b>&</b>' }).html).toContain('A &lt;b&gt;&amp;&lt;/b&gt;');
  });
});
