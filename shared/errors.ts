// Error codes and the one error body every API failure uses:
//   { error: { code, message, details? } }
// `details` lists what is wrong field by field (`path` is dotted, e.g. "reference.groupA.0").
// The HTTP status of each code is fixed in one place on the server (server/errors.ts).
import { z } from 'zod';

export const ERROR_CODES = [
  'VALIDATION', // 400: the request body, query or path is malformed; details name each field
  'INVALID_TOKEN', // 400: an invitation or password-reset link is unknown, used, revoked or expired
  'UNAUTHENTICATED', // 401: not signed in (or the session ended)
  'INVALID_CREDENTIALS', // 401: e-mail or password wrong (never says which)
  'FORBIDDEN', // 403: signed in, but the role lacks the permission
  'CSRF', // 403: state-changing request without a valid x-csrf-token header
  'ACCOUNT_DISABLED', // 403: the person was disabled by an administrator
  'NOT_FOUND', // 404
  'CONFLICT', // 409: duplicate, still referenced, or would break an invariant
  'PAYLOAD_TOO_LARGE', // 413
  'BAD_FILE', // 400: an uploaded file breaks a rule; the message names the first offending line and the reason
  'UNMAPPED_COLUMNS', // 400: uploaded columns match no channel; details list them and the known channels
  'DUPLICATE', // 409: the uploaded bytes are already a recording (the message names it)
  'RATE_LIMITED', // 429
  'INTERNAL', // 500
  'UNAVAILABLE', // 503: the database or Redis is unreachable; retry later
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

export const errorDetailSchema = z.object({
  /** Dotted path of the offending field ('' for the whole body). */
  path: z.string(),
  message: z.string(),
});
export type ErrorDetail = z.infer<typeof errorDetailSchema>;

export const errorBodySchema = z.object({
  error: z.object({
    code: z.enum(ERROR_CODES),
    message: z.string(),
    details: z.array(errorDetailSchema).optional(),
  }),
});
export type ErrorBody = z.infer<typeof errorBodySchema>;

/** The header carrying the CSRF synchronizer token on POST/PUT/PATCH/DELETE. */
export const CSRF_HEADER = 'x-csrf-token';
