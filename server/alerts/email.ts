// The alert e-mails (opened / escalated / cleared), plain text first with a simple HTML twin.
import type { EmailJob } from '../../jobs/queues';
import { ADVISORY_CAUTION } from '../../shared/api/alerts';

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);

export interface AlertEmailInput {
  to: string;
  displayName: string;
  event: 'opened' | 'escalated' | 'cleared';
  alertId: number;
  kind: 'poor' | 'forced';
  level: number;
  trackName: string;
  poorBelow: number;
  lowBelow: number;
  worstDamping: number | null;
  openedAt: Date;
  escalatedAt: Date | null;
  clearedAt: Date | null;
  appUrl: string;
}

export function alertLink(appUrl: string, alertId: number): string {
  return `${appUrl}/alerts/${alertId}`;
}

const fmtTime = (d: Date) => d.toISOString().replace('T', ' ').replace(/\.\d+Z$/, ' UTC');

export function alertEmail(p: AlertEmailInput): EmailJob {
  const what = p.kind === 'poor' ? 'poorly damped mode' : 'forced oscillation';
  const verb = p.event === 'opened' ? 'Alert opened' : p.event === 'escalated' ? 'Alert escalated' : 'Alert cleared';
  const subject = `[Keel] ${verb}: ${p.trackName} — ${what}`;
  const lines = [`Hello ${p.displayName},`, ''];
  if (p.kind === 'poor') {
    const worst = p.worstDamping === null ? 'n/a' : `${p.worstDamping.toFixed(1)} %`;
    if (p.event === 'opened') {
      lines.push(`The ${p.trackName} mode has been poorly damped (damping under ${p.poorBelow} %, upper confidence bound included) for several consecutive scan windows.`);
    } else if (p.event === 'escalated') {
      lines.push(`The ${p.trackName} alert has escalated (level ${p.level}): the mode stays poorly damped or its damping fell further.`);
    } else {
      lines.push(`The ${p.trackName} mode is damped at ${p.lowBelow} % or more again for several consecutive scan windows; the alert is cleared.`);
    }
    lines.push('', `Lowest damping while open: ${worst}`);
  } else if (p.event === 'opened') {
    lines.push(`A sustained forced oscillation was detected in the ${p.trackName} band for several consecutive scan windows. It is not counted as poor damping.`);
  } else {
    lines.push(`The forced oscillation in the ${p.trackName} band is gone; the alert is cleared.`);
  }
  lines.push(`Opened: ${fmtTime(p.openedAt)}`);
  if (p.escalatedAt) lines.push(`Escalated: ${fmtTime(p.escalatedAt)}`);
  if (p.clearedAt) lines.push(`Cleared: ${fmtTime(p.clearedAt)}`);
  const link = alertLink(p.appUrl, p.alertId);
  lines.push('', `See the alert, its damping trace and mode shape: ${link}`, '', ADVISORY_CAUTION, '', 'You get this because you follow this mode track in Keel.');
  const text = lines.join('\n');
  const html =
    lines
      .filter((l) => l !== '')
      .map((l) => (l.includes(link) ? `<p><a href="${escapeHtml(link)}">See the alert, its damping trace and mode shape</a></p>` : `<p>${escapeHtml(l)}</p>`))
      .join('');
  return { kind: 'alert', to: p.to, subject, text, html };
}
