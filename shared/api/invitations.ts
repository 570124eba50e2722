// Invitations: an administrator invites an e-mail address with a role; the invitee gets a
// single-use link APP_URL/accept-invite?token=… (valid 72 h), sets a display name and a password.
import { z } from 'zod';
import { ROLES, roleSchema } from '../roles';
import { personSchema } from './auth';
import { displayNameSchema, emailSchema, isoDateTime, linkTokenSchema, newPasswordSchema } from './common';

export const INVITATION_TTL_HOURS = 72;
export const INVITATION_STATUSES = ['pending', 'used', 'expired', 'revoked'] as const;

export const invitationSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  role: z.enum(ROLES),
  status: z.enum(INVITATION_STATUSES),
  invitedBy: z.object({ id: z.number().int(), displayName: z.string() }).nullable(),
  createdAt: isoDateTime,
  expiresAt: isoDateTime,
  usedAt: isoDateTime.nullable(),
  revokedAt: isoDateTime.nullable(),
});
export type Invitation = z.infer<typeof invitationSchema>;

export const invitationListResponseSchema = z.object({ invitations: z.array(invitationSchema) });
export type InvitationListResponse = z.infer<typeof invitationListResponseSchema>;

export const invitationCreateBodySchema = z.object({ email: emailSchema, role: roleSchema }).strict();
export type InvitationCreateBody = z.infer<typeof invitationCreateBodySchema>;

export const invitationResponseSchema = z.object({ invitation: invitationSchema });
export type InvitationResponse = z.infer<typeof invitationResponseSchema>;

/** GET /api/invitations/token/:token — what the accept screen shows before the form. */
export const invitationTokenParamsSchema = z.object({ token: linkTokenSchema });
export const invitationLookupResponseSchema = z.object({
  email: z.string(),
  role: z.enum(ROLES),
  expiresAt: isoDateTime,
});
export type InvitationLookupResponse = z.infer<typeof invitationLookupResponseSchema>;

export const invitationAcceptBodySchema = z
  .object({ token: linkTokenSchema, displayName: displayNameSchema, password: newPasswordSchema })
  .strict();
export type InvitationAcceptBody = z.infer<typeof invitationAcceptBodySchema>;

/** The new person; they sign in next with their e-mail and the password just set. */
export const invitationAcceptResponseSchema = z.object({ person: personSchema });
export type InvitationAcceptResponse = z.infer<typeof invitationAcceptResponseSchema>;
