// Sign-in, the current person and the CSRF token.
// Flow for a client: GET /api/auth/csrf → { csrfToken }; send it as header x-csrf-token on every
// POST/PUT/PATCH/DELETE (sign-in included). Sign-in rotates the session, so use the csrfToken the
// sign-in response returns from then on. After sign-out fetch a fresh token.
import { z } from 'zod';
import { ROLES, permissionSchema } from '../roles';
import { emailSchema, isoDateTime } from './common';

export const personSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  role: z.enum(ROLES),
  disabled: z.boolean(),
  createdAt: isoDateTime,
});
export type Person = z.infer<typeof personSchema>;

// `signedIn` lets the client find out whether a session exists without provoking a 401 (a
// signed-out page load would otherwise log a console error for the /me request).
export const csrfResponseSchema = z.object({ csrfToken: z.string(), signedIn: z.boolean() });
export type CsrfResponse = z.infer<typeof csrfResponseSchema>;

export const signInBodySchema = z.object({
  email: emailSchema,
  // Any non-empty string: the password policy applies when a password is set, not when it is tried.
  password: z
    .string({ error: 'Password is required' })
    .min(1, { error: 'Password is required' })
    .max(1024, { error: 'Password is too long' }),
});
export type SignInBody = z.infer<typeof signInBodySchema>;

export const meResponseSchema = z.object({
  person: personSchema,
  permissions: z.array(permissionSchema),
  csrfToken: z.string(),
});
export type MeResponse = z.infer<typeof meResponseSchema>;

/** Sign-in answers like /me, with the rotated session's CSRF token. */
export const signInResponseSchema = meResponseSchema;
export type SignInResponse = MeResponse;
