// Invitations: an administrator invites an address with a role; the e-mailed single-use link
// (token stored hashed) lets the invitee choose a display name and password.
import { recordAudit } from '../../db/queries/audit';
import {
  createInvitation,
  findInvitationByTokenHash,
  getInvitation,
  invitationStatus,
  listInvitations,
  markInvitationUsed,
  revokeInvitation,
  revokePendingInvitationsFor,
  type InvitationRow,
} from '../../db/queries/invitations';
import { createPerson, findPersonByEmail } from '../../db/queries/people';
import { INVITATION_TTL_HOURS } from '../../shared/api/invitations';
import { hashPassword } from '../auth/passwords';
import { hashLinkToken, newLinkToken } from '../auth/tokens';
import { invitationEmail, invitationLink } from '../email/templates';
import { ConflictError, InvalidTokenError, NotFoundError } from '../errors';
import { toInvitation, toPerson } from '../dto';
import { queueOrUnavailable } from './mail';
import { route, type RouteDef } from './registry';

const INVALID_LINK = 'This invitation link is not valid: it has expired, was already used or was withdrawn. Ask an administrator for a new one';

function usable(inv: InvitationRow | undefined, now: Date): InvitationRow {
  if (!inv || invitationStatus(inv, now) !== 'pending') throw new InvalidTokenError(INVALID_LINK);
  return inv;
}

export function invitationRoutes(): RouteDef[] {
  return [
    route('invitations.list', async ({ deps }) => {
      const now = deps.now();
      return { invitations: (await listInvitations(deps.db)).map((i) => toInvitation(i, now)) };
    }),

    route(
      'invitations.create',
      async ({ deps, body, person: actor, ip }) => {
        const now = deps.now();
        const id = await deps.db.transaction(async (tx) => {
          if (await findPersonByEmail(tx, { email: body.email })) {
            throw new ConflictError(`${body.email} already has an account`, [{ path: 'email', message: 'Already has an account' }]);
          }
          const replaced = await revokePendingInvitationsFor(tx, { email: body.email, at: now });
          const { token, tokenHash } = newLinkToken();
          const inv = await createInvitation(tx, {
            email: body.email,
            role: body.role,
            tokenHash,
            invitedBy: actor!.id,
            expiresAt: new Date(now.getTime() + INVITATION_TTL_HOURS * 3600_000),
          });
          await recordAudit(tx, {
            personId: actor!.id,
            action: 'invitation.create',
            target: `invitation:${inv.id}`,
            details: { email: inv.email, role: inv.role, replaced },
            ip,
          });
          // Queued inside the transaction: if Redis refuses, nothing is stored either.
          await queueOrUnavailable(
            deps,
            invitationEmail({ to: inv.email, role: inv.role, inviterName: actor!.displayName, link: invitationLink(deps.config.appUrl, token) }),
          );
          return inv.id;
        });
        return { invitation: toInvitation((await getInvitation(deps.db, { id }))!, now) };
      },
      { rateLimit: 'invitations' },
    ),

    route('invitations.revoke', async ({ deps, params, person: actor, ip }) => {
      const now = deps.now();
      await deps.db.transaction(async (tx) => {
        const inv = await getInvitation(tx, { id: params.id });
        if (!inv) throw new NotFoundError(`No invitation with id ${params.id}`);
        const status = invitationStatus(inv, now);
        if (status !== 'pending') throw new ConflictError(`This invitation is already ${status}`);
        await revokeInvitation(tx, { id: inv.id, at: now });
        await recordAudit(tx, { personId: actor!.id, action: 'invitation.revoke', target: `invitation:${inv.id}`, details: { email: inv.email }, ip });
      });
      return { invitation: toInvitation((await getInvitation(deps.db, { id: params.id }))!, now) };
    }),

    route(
      'invitations.lookup',
      async ({ deps, params }) => {
        const inv = usable(await findInvitationByTokenHash(deps.db, { tokenHash: hashLinkToken(params.token) }), deps.now());
        return { email: inv.email, role: inv.role, expiresAt: inv.expiresAt.toISOString() };
      },
      { rateLimit: 'linkTokens' },
    ),

    route(
      'invitations.accept',
      async ({ deps, body, ip }) => {
        const passwordHash = await hashPassword(body.password); // slow: before the row lock
        const person = await deps.db.transaction(async (tx) => {
          const now = deps.now();
          const inv = usable(await findInvitationByTokenHash(tx, { tokenHash: hashLinkToken(body.token), forUpdate: true }), now);
          if (await findPersonByEmail(tx, { email: inv.email })) {
            throw new ConflictError(`${inv.email} already has an account; sign in instead`);
          }
          const created = await createPerson(tx, { email: inv.email, displayName: body.displayName, role: inv.role, passwordHash });
          await markInvitationUsed(tx, { id: inv.id, personId: created.id, at: now });
          await recordAudit(tx, {
            personId: created.id,
            action: 'invitation.accept',
            target: `invitation:${inv.id}`,
            details: { email: created.email, role: created.role },
            ip,
          });
          return created;
        });
        return { person: toPerson(person) };
      },
      { rateLimit: 'linkTokens' },
    ),
  ];
}
