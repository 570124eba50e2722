// CSRF protection for cookie sessions: a synchronizer token kept in the session, handed out by
// GET /api/auth/csrf (and by sign-in and /me), required in the x-csrf-token header on every
// POST/PUT/PATCH/DELETE — sign-in included, so a cross-site form cannot sign a victim in.
import type { Request, RequestHandler } from 'express';
import 'express-session';
import { CSRF_HEADER } from '../../shared/errors';
import { CsrfError } from '../errors';
import { newCsrfToken, safeEqualStrings } from './tokens';

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string;
  }
}

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The session's token, minted on first use (this saves the session and sets the cookie). */
export function csrfTokenOf(req: Request): string {
  if (!req.session) throw new Error('csrfTokenOf needs the session middleware');
  req.session.csrfToken ??= newCsrfToken();
  return req.session.csrfToken;
}

/**
 * The session's token, stored before it is handed out: a token the store never kept would only
 * fail later, so a store outage answers now (503) instead.
 */
export async function savedCsrfTokenOf(req: Request): Promise<string> {
  const had = req.session.csrfToken;
  const token = csrfTokenOf(req);
  if (had !== token) await new Promise<void>((resolve, reject) => req.session.save((err) => (err ? reject(err) : resolve())));
  return token;
}

/** After the session id rotates (sign-in), mint a new token for the new session. */
export function rotateCsrfToken(req: Request): string {
  req.session.csrfToken = newCsrfToken();
  return req.session.csrfToken;
}

export const requireCsrf: RequestHandler = (req, _res, next) => {
  if (SAFE.has(req.method)) return next();
  const sent = req.get(CSRF_HEADER);
  const expected = req.session?.csrfToken;
  if (!sent || !expected || !safeEqualStrings(sent, expected)) return next(new CsrfError());
  next();
};
