// The server process's event bus and analysis queues, made on first use from the configuration
// (two Redis connections for the bus: one publishes, one subscribes; one for the queues). On
// SIGTERM/SIGINT every open event stream is ended, so the HTTP server's close() is not held open
// by long-lived SSE connections.
import type { ServerResponse } from 'node:http';
import { Redis } from 'ioredis';
import { createAnalysisQueues, type AnalysisQueues } from '../../jobs/processors/analysis-queues';
import type { Deps } from '../deps';
import { createReadCache, type ReadCache } from '../read-cache';
import { createEventBus, eventChannel, type EventBus } from './bus';

interface Live {
  bus: EventBus;
  queues: AnalysisQueues;
}

const byDeps = new WeakMap<Deps, Live>();
const openStreams = new Set<ServerResponse>();
let hooked = false;

function hookShutdown(): void {
  if (hooked) return;
  hooked = true;
  const endAll = () => {
    for (const res of openStreams) res.end();
    openStreams.clear();
  };
  process.once('SIGTERM', endAll);
  process.once('SIGINT', endAll);
}

function live(deps: Deps): Live {
  let l = byDeps.get(deps);
  if (!l) {
    const mk = () => {
      const r = new Redis(deps.config.redisUrl, { maxRetriesPerRequest: null });
      r.on('error', (e: Error) => deps.log.warn(`redis (live events): ${e.message}`));
      return r;
    };
    const publisher = mk();
    l = {
      bus: createEventBus({ publisher, subscriber: mk(), channel: eventChannel(deps.config.queuePrefix) }),
      queues: createAnalysisQueues(publisher, deps.config.queuePrefix),
    };
    byDeps.set(deps, l);
    hookShutdown();
  }
  return l;
}

export function liveBus(deps: Deps): EventBus {
  return live(deps).bus;
}

export function analysisQueues(deps: Deps): AnalysisQueues {
  return live(deps).queues;
}

/** Tracks an open SSE response so shutdown can end it. */
export function trackStream(res: ServerResponse): void {
  openStreams.add(res);
  res.on('close', () => openStreams.delete(res));
}

const caches = new WeakMap<Deps, ReadCache>();

/**
 * This process's cache of hot read results (server/read-cache.ts), made on first use. Every live
 * event (a scan stored windows, an alert changed — from any worker or server) empties it.
 */
export function readCache(deps: Deps): ReadCache {
  let c = caches.get(deps);
  if (!c) {
    const cache = createReadCache({ ttlMs: deps.config.readCacheMs });
    c = cache;
    caches.set(deps, cache);
    if (deps.config.readCacheMs > 0) {
      liveBus(deps)
        .subscribe(() => cache.invalidate())
        .catch((err: Error) => deps.log.warn(`read cache: could not subscribe to live events (entries expire after ${deps.config.readCacheMs} ms): ${err.message}`));
    }
  }
  return c;
}

/** Empties this process's read cache if it has one (after a state-changing request). */
export function invalidateReadCache(deps: Deps): void {
  caches.get(deps)?.invalidate();
}
