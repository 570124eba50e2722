// The e-mails Keel sends about accounts. Plain text first (the Outbox shows it), with a simple
// HTML twin. Links are built from APP_URL so they work behind whatever host serves the app.
import { ROLE_LABELS, type Role } from '../../shared/roles';
import { INVITATION_TTL_HOURS } from '../../shared/api/invitations';
import { PASSWORD_RESET_TTL_MINUTES } from '../../shared/api/password-reset';
import type { EmailJob } from '../../jobs/queues';

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);

export function invitationLink(appUrl: string, token: string): string {
  return `${appUrl}/accept-invite?token=${encodeURIComponent(token)}`;
}

export function passwordResetLink(appUrl: string, token: string): string {
  return `${appUrl}/reset-password?token=${encodeURIComponent(token)}`;
}

export function invitationEmail(p: { to: string; role: Role; inviterName: string; link: string }): EmailJob {
  const role = ROLE_LABELS[p.role];
  const text = [
    `${p.inviterName} invited you to Keel as ${role}.`,
    '',
    'Keel watches the oscillation modes of the Tarrow Interconnection from PMU data.',
    '',
    `Accept the invitation and choose your password here (the link works once, for ${INVITATION_TTL_HOURS} hours):`,
    p.link,
    '',
    'If you did not expect this, ignore this message.',
  ].join('\n');
  const html =
    `<p>${escapeHtml(p.inviterName)} invited you to Keel as <strong>${escapeHtml(role)}</strong>.</p>` +
    `<p><a href="${escapeHtml(p.link)}">Accept the invitation</a> (the link works once, for ${INVITATION_TTL_HOURS} hours).</p>` +
    `<p>If you did not expect this, ignore this message.</p>`;
  return { kind: 'invitation', to: p.to, subject: 'Your invitation to Keel', text, html };
}

export function passwordResetEmail(p: { to: string; displayName: string; link: string }): EmailJob {
  const text = [
    `Hello ${p.displayName},`,
    '',
    `Someone asked to reset your Keel password. Choose a new one here (the link works once, for ${PASSWORD_RESET_TTL_MINUTES} minutes):`,
    p.link,
    '',
    'If it was not you, ignore this message: your password stays as it is.',
  ].join('\n');
  const html =
    `<p>Hello ${escapeHtml(p.displayName)},</p>` +
    `<p>Someone asked to reset your Keel password. <a href="${escapeHtml(p.link)}">Choose a new one</a> ` +
    `(the link works once, for ${PASSWORD_RESET_TTL_MINUTES} minutes).</p>` +
    `<p>If it was not you, ignore this message: your password stays as it is.</p>`;
  return { kind: 'password-reset', to: p.to, subject: 'Reset your Keel password', text, html };
}
