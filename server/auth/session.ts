// Cookie sessions stored in PostgreSQL (connect-pg-simple, table "session" from our migration),
// then passport on top. HttpOnly + SameSite=Lax cookies; Secure when COOKIE_SECURE is set.
import connectPgSimple from 'connect-pg-simple';
import type { RequestHandler } from 'express';
import session from 'express-session';
import type { Deps } from '../deps';
import { createPassport } from './passport';

export type KeelPassport = ReturnType<typeof createPassport>;

export const SESSION_COOKIE_NAME = 'keel.sid';
/** Idle timeout: every request extends the session (rolling), 12 h after the last one it ends. */
export const SESSION_MAX_AGE_MS = 12 * 3600 * 1000;

export interface SessionSetup {
  middleware: RequestHandler[];
  passport: KeelPassport;
  close(): Promise<void>;
}

export function createSession(deps: Deps): SessionSetup {
  const PgStore = connectPgSimple(session);
  const store = new PgStore({
    pool: deps.pool,
    tableName: 'session',
    createTableIfMissing: false,
    pruneSessionInterval: 15 * 60,
    errorLog: (...args: unknown[]) => deps.log.warn(`session store: ${args.map(String).join(' ')}`),
  });
  const passport = createPassport(deps);
  const sessionMw = session({
    name: SESSION_COOKIE_NAME,
    secret: deps.config.sessionSecret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    proxy: deps.config.cookieSecure,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: deps.config.cookieSecure,
      maxAge: SESSION_MAX_AGE_MS,
      path: '/',
    },
  });
  return {
    middleware: [sessionMw, passport.initialize(), passport.session()],
    passport,
    close: async () => {
      await store.close();
    },
  };
}
