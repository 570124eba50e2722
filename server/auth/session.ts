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
/**
 * How often one server process writes a session's new expiry to PostgreSQL. express-session
 * touches the store on every request; at 50 concurrent clients that row update was most of what a
 * signed-in read cost (bench:api). Writing at most every 5 min makes the idle timeout 11 h 55 min
 * to 12 h instead of exactly 12 h; the cookie itself still rolls on every answer.
 */
export const SESSION_TOUCH_EVERY_MS = 5 * 60 * 1000;
/** Sessions remembered by the touch throttle; beyond it the oldest are forgotten (and simply touched again). */
const TOUCH_MEMORY = 10_000;

/**
 * Wraps a store's touch() so each session id is written at most once per `everyMs` by this
 * process. The session's expiry in the store never runs more than `everyMs` behind the last request.
 */
export function throttleTouch(
  store: { touch(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void },
  everyMs: number,
  nowMs: () => number = Date.now,
): Map<string, number> {
  const last = new Map<string, number>();
  const touch = store.touch.bind(store);
  store.touch = (sid, sess, cb) => {
    const now = nowMs();
    const prev = last.get(sid);
    if (prev !== undefined && now - prev < everyMs) {
      cb?.();
      return;
    }
    touch(sid, sess, (err?: unknown) => {
      if (!err) {
        last.delete(sid); // re-insert: Map order is the eviction order
        last.set(sid, now);
        if (last.size > TOUCH_MEMORY) last.delete(last.keys().next().value!);
      }
      cb?.(err);
    });
  };
  return last;
}

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
  throttleTouch(store, SESSION_TOUCH_EVERY_MS);
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
