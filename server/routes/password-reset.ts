// Password reset by e-mailed single-use link. The request always answers the same, so it never
// tells whether an address has an account.
import { recordAudit } from '../../db/queries/audit';
import { createPasswordReset, findPasswordResetByTokenHash, usePasswordResets } from '../../db/queries/password-resets';
import { deleteSessionsOfPerson, findPersonByEmail, updatePerson } from '../../db/queries/people';
import { PASSWORD_RESET_TTL_MINUTES } from '../../shared/api/password-reset';
import { hashPassword } from '../auth/passwords';
import { hashLinkToken, newLinkToken } from '../auth/tokens';
import { passwordResetEmail, passwordResetLink } from '../email/templates';
import { InvalidTokenError } from '../errors';
import { queueOrUnavailable } from './mail';
import { route, type RouteDef } from './registry';

const SAME_ANSWER = 'If an account exists for that address, a reset link is on its way';
const INVALID_LINK = 'This reset link is not valid: it has expired or was already used. Ask for a new one';

export function passwordResetRoutes(): RouteDef[] {
  return [
    route(
      'passwordReset.request',
      async ({ deps, body, ip }) => {
        const now = deps.now();
        await deps.db.transaction(async (tx) => {
          const person = await findPersonByEmail(tx, { email: body.email });
          if (!person || person.disabled) {
            await recordAudit(tx, { personId: null, action: 'password-reset.request', details: { email: body.email, sent: false }, ip });
            return;
          }
          const { token, tokenHash } = newLinkToken();
          await createPasswordReset(tx, {
            personId: person.id,
            tokenHash,
            expiresAt: new Date(now.getTime() + PASSWORD_RESET_TTL_MINUTES * 60_000),
          });
          await recordAudit(tx, {
            personId: null,
            action: 'password-reset.request',
            target: `person:${person.id}`,
            details: { email: body.email, sent: true },
            ip,
          });
          await queueOrUnavailable(
            deps,
            passwordResetEmail({ to: person.email, displayName: person.displayName, link: passwordResetLink(deps.config.appUrl, token) }),
          );
        });
        return { ok: true as const, message: SAME_ANSWER };
      },
      { rateLimit: 'passwordReset' },
    ),

    route(
      'passwordReset.complete',
      async ({ deps, body, ip }) => {
        const passwordHash = await hashPassword(body.password);
        await deps.db.transaction(async (tx) => {
          const now = deps.now();
          const reset = await findPasswordResetByTokenHash(tx, { tokenHash: hashLinkToken(body.token), forUpdate: true });
          if (!reset || reset.usedAt || reset.expiresAt.getTime() <= now.getTime()) throw new InvalidTokenError(INVALID_LINK);
          await updatePerson(tx, { id: reset.personId, passwordHash });
          await usePasswordResets(tx, { personId: reset.personId, at: now });
          // Whoever may have had the old password loses their sessions with it.
          const ended = await deleteSessionsOfPerson(tx, { personId: reset.personId });
          await recordAudit(tx, {
            personId: reset.personId,
            action: 'password-reset.complete',
            target: `person:${reset.personId}`,
            details: { sessionsEnded: ended },
            ip,
          });
        });
        return { ok: true as const };
      },
      { rateLimit: 'linkTokens' },
    ),
  ];
}
