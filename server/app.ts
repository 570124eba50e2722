// createApp(deps): the Express application, separate from main.ts so tests can build one.
//   /api/*    the JSON API (server/routes), one error format, unknown paths → JSON 404
//   /*        the web export from WEB_DIST, index.html for client-side routes
import fs from 'node:fs';
import path from 'node:path';
import express, { type ErrorRequestHandler, type Express, type RequestHandler } from 'express';
import helmet from 'helmet';
import { createRateLimits } from './auth/rate-limits';
import { createSession } from './auth/session';
import type { Deps } from './deps';
import { invalidateReadCache } from './events/live';
import { httpError, NotFoundError, PayloadTooLargeError, ValidationError } from './errors';
import { allRoutes } from './routes';
import { mountRoutes, routeTable, type RouteEntry } from './routes/registry';

export interface KeelApp {
  app: Express;
  /** The mounted routes (method, path, access) — the registry the role tests enumerate. */
  routes: RouteEntry[];
  /** Stops the session store's pruning timer (the pool belongs to deps). */
  close(): Promise<void>;
}

export const JSON_BODY_LIMIT = '200kb';

/**
 * Content Security Policy fit for the Expo web export: scripts and fonts are files of our own
 * origin; react-native-web writes its styles into <style> elements at run time, which needs
 * 'unsafe-inline' for styles (not for scripts).
 */
export function cspDirectives(secure: boolean): Record<string, string[] | null> {
  return {
    defaultSrc: ["'self'"],
    scriptSrc: ["'self'"],
    styleSrc: ["'self'", "'unsafe-inline'"],
    imgSrc: ["'self'", 'data:', 'blob:'],
    fontSrc: ["'self'", 'data:'],
    connectSrc: ["'self'"],
    workerSrc: ["'self'", 'blob:'],
    objectSrc: ["'none'"],
    baseUri: ["'self'"],
    formAction: ["'self'"],
    frameAncestors: ["'none'"],
    upgradeInsecureRequests: secure ? [] : null,
  };
}

export function createApp(deps: Deps): KeelApp {
  const app = express();
  const { config } = deps;
  app.disable('x-powered-by');
  // API answers are no-store, so an ETag (a hash of every answer body) would never be used.
  app.set('etag', false);
  if (config.cookieSecure) app.set('trust proxy', 1);

  app.use(
    helmet({
      contentSecurityPolicy: { useDefaults: false, directives: cspDirectives(config.cookieSecure) },
      hsts: config.cookieSecure ? undefined : false,
      crossOriginEmbedderPolicy: false,
    }),
  );

  const session = createSession(deps);
  const api = express.Router();
  const json = express.json({ limit: JSON_BODY_LIMIT });
  api.use((req, res, next) => (req.method === 'GET' || req.method === 'HEAD' ? next() : json(req, res, next)));
  api.use((req, res, next) => {
    res.set('Cache-Control', 'no-store');
    // A change made through this process shows in Watch/Trends at once (server/read-cache.ts);
    // emptied when the answer is sent, i.e. after the change was committed.
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      res.on('finish', () => {
        if (res.statusCode < 400) invalidateReadCache(deps);
      });
    }
    next();
  });
  const routes = allRoutes(session.passport);
  mountRoutes(api, routes, {
    deps,
    session: session.middleware,
    rateLimits: createRateLimits({ redis: deps.redis, prefix: config.queuePrefix, warn: (m) => deps.log.warn(m) }),
    checkResponses: !config.production,
    basePath: '/api',
  });
  api.use((req, _res, next) => next(new NotFoundError(`No API route ${req.method} ${req.originalUrl.split('?')[0]}`)));
  api.use(apiErrorHandler(deps));
  app.use('/api', api);

  app.use(webExport(config.webDist));
  return { app, routes: routeTable(routes), close: session.close };
}

function apiErrorHandler(deps: Deps): ErrorRequestHandler {
  return (err, req, res, _next) => {
    let cause: unknown = err;
    // body-parser's own errors carry a `type`
    const type = (err as { type?: string }).type;
    if (type === 'entity.parse.failed') cause = new ValidationError('The request body is not valid JSON', [{ path: '', message: 'Malformed JSON' }]);
    else if (type === 'entity.too.large') cause = new PayloadTooLargeError(`The request body is larger than ${JSON_BODY_LIMIT}`);
    const { status, body, appError } = httpError(cause);
    if (status >= 500) {
      if (appError.code === 'UNAVAILABLE') deps.log.warn(`${req.method} ${req.originalUrl}: ${String((err as Error)?.message ?? err)}`);
      else deps.log.error(`${req.method} ${req.originalUrl} failed`, err);
    }
    if (res.headersSent) return;
    res.status(status).json(body);
  };
}

/** Static files of the web export; any other GET gets index.html (client-side routes). */
function webExport(dir: string): RequestHandler {
  const router = express.Router();
  const index = path.join(dir, 'index.html');
  router.use(express.static(dir, { index: false, maxAge: '1h', fallthrough: true }));
  router.get('/{*splat}', (_req, res) => {
    if (!fs.existsSync(index)) {
      res.status(404).type('text/plain').send(`The web app is not built (no ${index}); run npm run build:web`);
      return;
    }
    res.set('Cache-Control', 'no-cache');
    res.sendFile(index);
  });
  return router;
}
