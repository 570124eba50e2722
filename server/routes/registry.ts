// The route registry. Every route is one entry of shared/api/endpoints.ts (method, path, access
// rule, schemas) plus a handler here; mountRoutes() builds each route's middleware chain the same
// way, so no route can skip the access check, the CSRF check or input validation:
//   session → CSRF (POST/PUT/PATCH/DELETE) → allow(access) → rate limit → validate → handler
import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type {} from 'passport';
import type { z } from 'zod';
import type { PersonRow } from '../../db/queries/people';
import { ENDPOINTS, type EndpointDef, type EndpointKey } from '../../shared/api/endpoints';
import type { Access } from '../../shared/roles';
import { allow } from '../auth/allow';
import { requireCsrf } from '../auth/csrf';
import type { Deps } from '../deps';
import type { ErrorDetail } from '../../shared/errors';
import { InternalError, validationError, zodDetails } from '../errors';

type Out<S> = S extends z.ZodType ? z.output<S> : undefined;
type In<S> = S extends z.ZodType ? z.input<S> : never;

export type RateLimitName = 'signIn' | 'invitations' | 'passwordReset' | 'linkTokens';

export interface RouteContext<K extends EndpointKey> {
  req: Request;
  res: Response;
  deps: Deps;
  params: Out<(typeof ENDPOINTS)[K] extends { params: infer P } ? P : undefined>;
  query: Out<(typeof ENDPOINTS)[K] extends { query: infer Q } ? Q : undefined>;
  body: Out<(typeof ENDPOINTS)[K] extends { body: infer B } ? B : undefined>;
  /** The signed-in person (null on public routes when nobody is signed in). */
  person: PersonRow | null;
  /** Client address (behind a proxy only when COOKIE_SECURE enables trust proxy). */
  ip: string | null;
  /** Answer with a status other than the endpoint's success status (e.g. health → 503). */
  setStatus(status: number): void;
}

/**
 * An answer serialised once and sent as is to many requests (the read cache keeps these: the
 * JSON text of a Watch snapshot is built once, not once per poll). `T` is the answer's type, so a
 * route can only return the JSON of its own response shape.
 */
export class JsonAnswer<T> {
  readonly text: string;
  /** Type marker only (never set). */
  declare readonly value?: T;
  constructor(value: T) {
    this.text = JSON.stringify(value);
  }
}

type Answer<K extends EndpointKey> = In<(typeof ENDPOINTS)[K]['response']>;

export interface RouteDef<K extends EndpointKey = EndpointKey> {
  key: K;
  handler: (ctx: RouteContext<K>) => Promise<Answer<K> | JsonAnswer<Answer<K>>>;
  rateLimit?: RateLimitName;
  /** false: mount without the session (health must answer while PostgreSQL is down). */
  session?: boolean;
}

export function route<K extends EndpointKey>(
  key: K,
  handler: RouteDef<K>['handler'],
  opts: Omit<RouteDef<K>, 'key' | 'handler'> = {},
): RouteDef<K> {
  return { key, handler, ...opts };
}

export interface MountOptions {
  deps: Deps;
  session: RequestHandler[];
  rateLimits: Record<RateLimitName, RequestHandler>;
  /** Check each answer against the endpoint's response schema (development and tests). */
  checkResponses: boolean;
  /** Where `router` is mounted; stripped from the catalogue's full paths. */
  basePath: string;
}

/** The registered routes as plain data (method, path, access) — what the role tests enumerate. */
export interface RouteEntry {
  key: EndpointKey;
  method: EndpointDef['method'];
  path: string;
  access: Access;
  status: number;
}

export function routeTable(routes: readonly RouteDef[]): RouteEntry[] {
  return routes.map((r) => {
    const e: EndpointDef = ENDPOINTS[r.key];
    return { key: r.key, method: e.method, path: e.path, access: e.access, status: e.status };
  });
}

/** Every endpoint of the catalogue has exactly one handler, and nothing else is registered. */
export function checkRegistry(routes: readonly RouteDef[]): void {
  const seen = new Map<string, number>();
  for (const r of routes) {
    if (!(r.key in ENDPOINTS)) throw new Error(`Route "${r.key}" is not in shared/api/endpoints.ts`);
    seen.set(r.key, (seen.get(r.key) ?? 0) + 1);
  }
  const twice = [...seen].filter(([, n]) => n > 1).map(([k]) => k);
  if (twice.length) throw new Error(`Routes registered twice: ${twice.join(', ')}`);
  const missing = (Object.keys(ENDPOINTS) as EndpointKey[]).filter((k) => !seen.has(k));
  if (missing.length) throw new Error(`Endpoints without a handler: ${missing.join(', ')}`);
}

const lower = { GET: 'get', POST: 'post', PUT: 'put', PATCH: 'patch', DELETE: 'delete' } as const;

export function mountRoutes(router: Router, routes: readonly RouteDef[], opts: MountOptions): void {
  checkRegistry(routes);
  for (const r of routes) {
    const e: EndpointDef = ENDPOINTS[r.key];
    const chain: RequestHandler[] = [];
    if (r.session !== false) chain.push(...opts.session, requireCsrf);
    chain.push(allow(e.access));
    if (r.rateLimit) chain.push(opts.rateLimits[r.rateLimit]);
    chain.push(handle(r as RouteDef, e, opts));
    if (!e.path.startsWith(`${opts.basePath}/`)) throw new Error(`Endpoint ${r.key} (${e.path}) is not under ${opts.basePath}`);
    router[lower[e.method]](e.path.slice(opts.basePath.length), ...chain);
  }
}

function handle(r: RouteDef, e: EndpointDef, opts: MountOptions): RequestHandler {
  return (req: Request, res: Response, next: NextFunction) => {
    const run = async () => {
      // Express 5 leaves req.body undefined without a JSON body: treat it as an empty object so
      // the field messages say what is missing. Path, query and body are checked together so
      // one answer names every wrong field.
      const { params, query, body } = parseInputs(e, { params: req.params, query: req.query, body: req.body ?? {} });
      if (e.body) req.body = body; // passport's local strategy reads the normalised fields
      let status = e.status;
      const result = await r.handler({
        req,
        res,
        deps: opts.deps,
        params,
        query,
        body,
        person: (req.user as PersonRow | undefined) ?? null,
        ip: req.ip ?? null,
        setStatus: (s) => {
          status = s;
        },
      } as RouteContext<EndpointKey>);
      // Streams and file downloads answer by themselves (headers already sent, nothing returned).
      if (res.headersSent) return;
      if (opts.checkResponses && status < 400) {
        const checked = e.response.safeParse(result instanceof JsonAnswer ? JSON.parse(result.text) : result);
        if (!checked.success) {
          opts.deps.log.error(`response of ${r.key} breaks its schema`, checked.error);
          throw new InternalError(`The server built an invalid answer for ${e.method} ${e.path}`);
        }
      }
      if (result instanceof JsonAnswer) res.status(status).type('application/json').send(result.text);
      else res.status(status).json(result);
    };
    run().catch(next);
  };
}

function parseInputs(
  e: EndpointDef,
  input: { params: unknown; query: unknown; body: unknown },
): { params: unknown; query: unknown; body: unknown } {
  const out: { params: unknown; query: unknown; body: unknown } = { params: undefined, query: undefined, body: undefined };
  const details: ErrorDetail[] = [];
  for (const part of ['params', 'query', 'body'] as const) {
    const schema = e[part];
    if (!schema) continue;
    const parsed = schema.safeParse(input[part]);
    if (parsed.success) out[part] = parsed.data;
    else details.push(...zodDetails(parsed.error, input[part]));
  }
  if (details.length) throw validationError(details);
  return out;
}
