// Password reset: request by e-mail (always answers the same, so it never tells whether an
// account exists), then complete with the token from APP_URL/reset-password?token=… (valid 1 h).
// Completing ends every existing session of that person.
import { z } from 'zod';
import { emailSchema, linkTokenSchema, newPasswordSchema } from './common';

export const PASSWORD_RESET_TTL_MINUTES = 60;

export const passwordResetRequestBodySchema = z.object({ email: emailSchema }).strict();
export type PasswordResetRequestBody = z.infer<typeof passwordResetRequestBodySchema>;

export const passwordResetRequestResponseSchema = z.object({ ok: z.literal(true), message: z.string() });
export type PasswordResetRequestResponse = z.infer<typeof passwordResetRequestResponseSchema>;

export const passwordResetCompleteBodySchema = z
  .object({ token: linkTokenSchema, password: newPasswordSchema })
  .strict();
export type PasswordResetCompleteBody = z.infer<typeof passwordResetCompleteBodySchema>;
