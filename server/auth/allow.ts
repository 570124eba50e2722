// allow(access): the one role check. Reads the table in shared/roles.ts; anonymous callers get
// 401, signed-in callers without the permission 403.
import type { RequestHandler } from 'express';
import type {} from 'passport';
import type { PersonRow } from '../../db/queries/people';
import { canAccess, PERMISSIONS, type Access } from '../../shared/roles';
import { ForbiddenError, UnauthenticatedError } from '../errors';

/** The middleware carries its rule (`access`) so tests can check every mounted route has one. */
export type AllowMiddleware = RequestHandler & { access: Access };

export function allow(access: Access): AllowMiddleware {
  const check: RequestHandler = (req, _res, next) => {
    if (access === 'public') return next();
    const person = req.user as PersonRow | undefined;
    if (!person) return next(new UnauthenticatedError());
    if (canAccess(person.role, access)) return next();
    const label = access === 'signedIn' ? 'this' : `"${PERMISSIONS[access].label}"`;
    return next(new ForbiddenError(`Your role (${person.role}) may not do ${label}`));
  };
  return Object.assign(check, { access });
}
