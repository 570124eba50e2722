// Sign-in, sign-out, the current person and the CSRF token.
import type { Request, Response } from 'express';
import { recordAudit } from '../../db/queries/audit';
import type { PersonRow } from '../../db/queries/people';
import type { MeResponse } from '../../shared/api/auth';
import { permissionsOf } from '../../shared/roles';
import { rotateCsrfToken, savedCsrfTokenOf } from '../auth/csrf';
import type { SignInInfo } from '../auth/passport';
import { SESSION_COOKIE_NAME, type KeelPassport } from '../auth/session';
import { AccountDisabledError, InvalidCredentialsError } from '../errors';
import { toPerson } from '../dto';
import { route, type RouteDef } from './registry';

function me(person: PersonRow, csrfToken: string): MeResponse {
  return { person: toPerson(person), permissions: permissionsOf(person.role), csrfToken };
}

function authenticate(passport: KeelPassport, req: Request, res: Response): Promise<{ person: PersonRow | null; info: SignInInfo | null }> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', { session: false }, (err: unknown, user: PersonRow | false, info: SignInInfo | undefined) => {
      if (err) reject(err);
      else resolve({ person: user || null, info: info ?? null });
    })(req, res, reject);
  });
}

const call = (fn: (cb: (err?: unknown) => void) => void) =>
  new Promise<void>((resolve, reject) => fn((err) => (err ? reject(err) : resolve())));

export function authRoutes(passport: KeelPassport): RouteDef[] {
  return [
    route('auth.csrf', async ({ req, person }) => ({ csrfToken: await savedCsrfTokenOf(req), signedIn: !!person })),

    route(
      'auth.signIn',
      async ({ req, res, deps, body, ip }) => {
        const { person, info } = await authenticate(passport, req, res);
        if (!person) {
          await recordAudit(deps.db, {
            personId: info?.personId ?? null,
            action: 'auth.sign-in-failed',
            target: info?.personId ? `person:${info.personId}` : null,
            details: { email: body.email, reason: info?.failure ?? 'unknown' },
            ip,
          });
          // Only someone who knows the password learns that the account is disabled.
          if (info?.failure === 'disabled') throw new AccountDisabledError();
          throw new InvalidCredentialsError();
        }
        // passport ≥ 0.6 regenerates the session here: a new id defeats session fixation.
        await call((cb) => req.login(person, cb));
        const csrfToken = rotateCsrfToken(req);
        await recordAudit(deps.db, { personId: person.id, action: 'auth.sign-in', target: `person:${person.id}`, ip });
        return me(person, csrfToken);
      },
      { rateLimit: 'signIn' },
    ),

    route('auth.signOut', async ({ req, res, deps, person, ip }) => {
      await recordAudit(deps.db, { personId: person!.id, action: 'auth.sign-out', target: `person:${person!.id}`, ip });
      await call((cb) => req.logout({ keepSessionInfo: false }, cb));
      await call((cb) => req.session.destroy(cb));
      res.clearCookie(SESSION_COOKIE_NAME, { path: '/' });
      return { ok: true as const };
    }),

    route('auth.me', async ({ req, person }) => me(person!, await savedCsrfTokenOf(req))),
  ];
}
