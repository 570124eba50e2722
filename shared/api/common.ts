// Building blocks shared by the resource schemas. Timestamps travel as ISO-8601 strings in UTC
// (what JSON.stringify makes of a Date); ids are positive integers.
import { z } from 'zod';

export const isoDateTime = z.iso.datetime({ offset: true });

export const idSchema = z.coerce
  .number({ error: 'Must be a number' })
  .int({ error: 'Must be a whole number' })
  .positive({ error: 'Must be a positive id' });

/** Path parameters of `/…/:id` routes. */
export const idParamsSchema = z.object({ id: idSchema });
export type IdParams = z.infer<typeof idParamsSchema>;

export const emailSchema = z
  .string({ error: 'E-mail is required' })
  .trim()
  .toLowerCase()
  .max(254, { error: 'E-mail is too long (254 characters at most)' })
  .pipe(z.email({ error: 'Not a valid e-mail address' }));

/** Policy for a new password (sign-in accepts any non-empty string, so old passwords still work). */
export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 256;
export const newPasswordSchema = z
  .string({ error: 'Password is required' })
  .min(PASSWORD_MIN, { error: `Password must be at least ${PASSWORD_MIN} characters` })
  .max(PASSWORD_MAX, { error: `Password must be at most ${PASSWORD_MAX} characters` });

export const displayNameSchema = z
  .string({ error: 'Display name is required' })
  .trim()
  .min(1, { error: 'Display name is required' })
  .max(100, { error: 'Display name must be at most 100 characters' });

/** Single-use tokens from e-mailed links: 32 random bytes, base64url (43 characters). */
export const linkTokenSchema = z
  .string({ error: 'Token is required' })
  .regex(/^[A-Za-z0-9_-]{20,100}$/, { error: 'Token is malformed' });

export const okSchema = z.object({ ok: z.literal(true) });
export type Ok = z.infer<typeof okSchema>;

/** Express-style path with `:name` parameters filled in, e.g. buildPath('/api/people/:id', { id: 3 }). */
export function buildPath(path: string, params: Record<string, string | number> = {}): string {
  return path.replace(/:([A-Za-z_][A-Za-z0-9_]*)/g, (_, name: string) => {
    const v = params[name];
    if (v === undefined) throw new Error(`buildPath: missing parameter "${name}" for ${path}`);
    return encodeURIComponent(String(v));
  });
}
