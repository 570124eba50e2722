// The mounted Express routes are exactly the endpoint catalogue, each behind allow() with the
// catalogue's rule, and every state-changing one behind the CSRF check. A route added to Express
// by hand (outside the registry) makes this fail.
import RedisMock from 'ioredis-mock';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDb } from '../../db/client';
import { ENDPOINT_KEYS, ENDPOINTS } from '../../shared/api/endpoints';
import { createApp, type KeelApp } from '../app';
import { requireCsrf } from '../auth/csrf';
import { loadConfig } from '../config';
import type { Deps } from '../deps';
import { checkRegistry, route } from './registry';

interface Layer {
  rawPath?: string;
  route?: { path: string; methods: Record<string, boolean>; stack: { handle: unknown }[] };
  handle: { stack?: Layer[] } & ((...a: unknown[]) => unknown);
}

let keel: KeelApp;
let pool: pg.Pool;
beforeAll(() => {
  const config = loadConfig({ DATABASE_URL: 'postgresql://nobody@127.0.0.1:1/none', NODE_ENV: 'test' }, () => undefined);
  pool = new pg.Pool({ connectionString: config.databaseUrl }); // never connected in this test
  const deps: Deps = {
    config,
    pool,
    db: createDb(pool),
    redis: new RedisMock() as unknown as Deps['redis'],
    mailer: { send: async () => undefined },
    log: { info: () => undefined, warn: () => undefined, error: () => undefined },
    now: () => new Date(),
  };
  keel = createApp(deps);
});
afterAll(async () => {
  await keel.close();
  await pool.end();
});

function mountedRoutes(): { method: string; path: string; handlers: unknown[] }[] {
  const stack = (keel.app as unknown as { router: { stack: Layer[] } }).router.stack;
  const out: { method: string; path: string; handlers: unknown[] }[] = [];
  const walk = (layers: Layer[], prefix: string) => {
    for (const l of layers) {
      if (l.route) {
        for (const m of Object.keys(l.route.methods)) {
          out.push({ method: m.toUpperCase(), path: prefix + l.route.path, handlers: l.route.stack.map((s) => s.handle) });
        }
      } else if (l.handle.stack) {
        walk(l.handle.stack, prefix + (l.rawPath && l.rawPath !== '/' ? l.rawPath : ''));
      }
    }
  };
  walk(stack, '');
  return out;
}

describe('route registry', () => {
  it('mounts every endpoint of the catalogue once, and under /api nothing else', () => {
    const api = mountedRoutes().filter((r) => r.path.startsWith('/api/'));
    const mounted = api.map((r) => `${r.method} ${r.path}`).sort();
    const catalogue = ENDPOINT_KEYS.map((k) => `${ENDPOINTS[k].method} ${ENDPOINTS[k].path}`).sort();
    expect(mounted).toEqual(catalogue);
    expect(keel.routes.map((r) => r.key).sort()).toEqual([...ENDPOINT_KEYS].sort());
  });

  it('puts allow(rule) from the catalogue on every API route, and the CSRF check on every state-changing one', () => {
    for (const r of mountedRoutes().filter((x) => x.path.startsWith('/api/'))) {
      const key = ENDPOINT_KEYS.find((k) => ENDPOINTS[k].method === r.method && ENDPOINTS[k].path === r.path)!;
      const rules = r.handlers.filter((h) => typeof h === 'function' && 'access' in h).map((h) => (h as { access: string }).access);
      expect(rules, `${r.method} ${r.path}`).toEqual([ENDPOINTS[key].access]);
      const guarded = r.handlers.includes(requireCsrf);
      if (r.method !== 'GET') expect(guarded, `${r.method} ${r.path} needs the CSRF check`).toBe(true);
      // allow() runs before the handler (the last function), so refusals never reach the handler.
      const allowAt = r.handlers.findIndex((h) => typeof h === 'function' && 'access' in h);
      expect(allowAt).toBeLessThan(r.handlers.length - 1);
      if (guarded) expect(r.handlers.indexOf(requireCsrf)).toBeLessThan(allowAt);
    }
  });

  it('serves the web export for every other GET (client-side routes)', () => {
    const rest = mountedRoutes().filter((x) => !x.path.startsWith('/api/'));
    expect(rest.map((r) => `${r.method} ${r.path}`)).toEqual(['GET /{*splat}']);
  });

  it('refuses a handler list that misses an endpoint or names one twice', () => {
    const health = route('health.get', async () => ({}) as never);
    expect(() => checkRegistry([health, health])).toThrow(/registered twice: health.get/);
    expect(() => checkRegistry([health])).toThrow(/Endpoints without a handler: auth\.csrf/);
  });
});
