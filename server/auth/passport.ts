// Passport with the local strategy (e-mail + password). Sessions keep only the person's id; the
// person is reloaded (through the ≤ 1 s read cache), so a role change applies at once and a
// disabled person is signed out.
import { Passport } from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { findPersonByEmail, findPersonById, type PersonRow } from '../../db/queries/people';
import type { Deps } from '../deps';
import { readCache } from '../events/live';
import { burnPasswordCheck, verifyPassword } from './passwords';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends PersonRow {}
  }
}

/** Why a sign-in failed: kept for the audit log only, never told to the caller. */
export type SignInFailure = 'unknown-email' | 'wrong-password' | 'disabled';
export interface SignInInfo {
  failure: SignInFailure;
  personId: number | null;
}

// passport-local's info type wants a message; ours is the failure kind (the caller shows one fixed text).
const info = (failure: SignInFailure, personId: number | null) => ({ message: failure, failure, personId });

export function createPassport(deps: Deps): InstanceType<typeof Passport> {
  const passport = new Passport();
  passport.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: false }, (email, password, done) => {
      (async () => {
        const person = await findPersonByEmail(deps.db, { email });
        if (!person) {
          await burnPasswordCheck(password);
          return done(null, false, info('unknown-email', null));
        }
        if (!(await verifyPassword(password, person.passwordHash))) {
          return done(null, false, info('wrong-password', person.id));
        }
        if (person.disabled) {
          return done(null, false, info('disabled', person.id));
        }
        return done(null, person);
      })().catch(done);
    }),
  );
  passport.serializeUser((user, done) => done(null, (user as PersonRow).id));
  passport.deserializeUser((id: unknown, done) => {
    if (typeof id !== 'number') return done(null, false);
    // Shared for up to READ_CACHE_MS by this process's concurrent requests; emptied after every
    // state-changing request here (a role change applies at once) and on every live event. Ending
    // a disabled person's sessions deletes their session rows, which this cache never holds.
    readCache(deps)
      .get(`person:${id}`, () => findPersonById(deps.db, { id }))
      .then(
        // A missing or disabled person ends the session's sign-in (passport drops the user).
        (person) => done(null, person && !person.disabled ? person : false),
        (err) => done(err),
      );
  });
  return passport;
}
