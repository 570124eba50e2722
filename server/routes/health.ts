// GET /api/health: PostgreSQL, Redis and worker status. Mounted without the session so it still
// answers (503 with the same body) while PostgreSQL is down.
import { heartbeatKeyPattern } from '../../jobs/queues';
import type { Deps } from '../deps';
import { route, type RouteDef } from './registry';

const CHECK_TIMEOUT_MS = 2000;

function within<T>(p: Promise<T>, ms: number): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  return Promise.race([
    p,
    new Promise<T>((_, reject) => {
      timer = setTimeout(() => reject(new Error('timed out')), ms);
    }),
  ]).finally(() => clearTimeout(timer));
}

/** Live worker heartbeats (keys expire on their own when a worker stops or dies). */
export async function countWorkers(deps: Deps): Promise<number> {
  let cursor = '0';
  let n = 0;
  do {
    const [next, keys] = await deps.redis.scan(cursor, 'MATCH', heartbeatKeyPattern(deps.config.queuePrefix), 'COUNT', 100);
    cursor = next;
    n += keys.length;
  } while (cursor !== '0');
  return n;
}

const startedAt = Date.now();

export function healthRoutes(): RouteDef[] {
  return [
    route(
      'health.get',
      async ({ deps, setStatus }) => {
        const [database, redis] = await Promise.all([
          within(deps.pool.query('select 1'), CHECK_TIMEOUT_MS).then(
            () => 'ok' as const,
            () => 'down' as const,
          ),
          within(deps.redis.ping(), CHECK_TIMEOUT_MS).then(
            () => 'ok' as const,
            () => 'down' as const,
          ),
        ]);
        const workers = redis === 'ok' ? await within(countWorkers(deps), CHECK_TIMEOUT_MS).catch(() => 0) : 0;
        const ok = database === 'ok' && redis === 'ok';
        if (!ok) setStatus(503);
        return {
          status: ok ? ('ok' as const) : ('degraded' as const),
          database,
          redis,
          worker: workers > 0 ? ('ok' as const) : ('absent' as const),
          workers,
          uptimeSeconds: Math.round((Date.now() - startedAt) / 1000),
          checkedAt: deps.now().toISOString(),
        };
      },
      { session: false },
    ),
  ];
}
