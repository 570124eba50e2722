// A short-lived cache of the database part of the screens' hottest reads (Watch, Trends), shared
// by every request of one server process.
//
// Why: Watch is polled by every open control-room screen and every poll ran the same statements;
// at 50 concurrent clients the server and PostgreSQL spent ≈ 11 ms CPU per answer (bench:api).
// What it keeps: query results, never a whole answer — anything that depends on the clock (ages,
// staleness, generatedAt) is still computed per request, and the access check runs before the
// cache is consulted.
// Freshness (the invariant the screens rely on): an entry is at most `ttlMs` old (1 s by default),
// and every entry is dropped
//   - when this process hears any live event (Redis pub/sub: a scan stored windows, a fit or an
//     ingest moved, an alert opened/escalated/cleared/was acknowledged — from any worker or server);
//   - after every successful state-changing API request of this process (network, tracks, alerts…).
// A lost event (Redis restarting) or a change made through another server process therefore
// shows within `ttlMs`. Concurrent misses of one key share one computation; a computation that
// started before an invalidation is handed to its callers but not kept.
export const READ_CACHE_TTL_MS = 1000;
/** Distinct keys kept at most (Trends URLs vary with the period); the oldest go first. */
export const READ_CACHE_MAX_ENTRIES = 500;

export interface ReadCacheStats {
  hits: number;
  misses: number;
  invalidations: number;
  size: number;
}

export interface ReadCache {
  /** The value under `key` if fresh, else the result of `compute` (shared by concurrent callers). */
  get<T>(key: string, compute: () => Promise<T>): Promise<T>;
  /** Drops every entry and every computation in flight. */
  invalidate(): void;
  stats(): ReadCacheStats;
}

interface Entry {
  at: number;
  value: Promise<unknown>;
  generation: number;
}

export function createReadCache(
  opts: { ttlMs?: number; maxEntries?: number; nowMs?: () => number } = {},
): ReadCache {
  const ttlMs = opts.ttlMs ?? READ_CACHE_TTL_MS;
  const maxEntries = opts.maxEntries ?? READ_CACHE_MAX_ENTRIES;
  const nowMs = opts.nowMs ?? (() => performance.now());
  const entries = new Map<string, Entry>();
  let generation = 0;
  const stats = { hits: 0, misses: 0, invalidations: 0 };

  return {
    get<T>(key: string, compute: () => Promise<T>): Promise<T> {
      const now = nowMs();
      const e = entries.get(key);
      if (e && e.generation === generation && now - e.at < ttlMs) {
        stats.hits++;
        return e.value as Promise<T>;
      }
      stats.misses++;
      const gen = generation;
      const value = compute();
      const entry: Entry = { at: now, value, generation: gen };
      entries.delete(key);
      entries.set(key, entry);
      if (entries.size > maxEntries) entries.delete(entries.keys().next().value!);
      // A failure is never kept: the next request tries again.
      value.catch(() => {
        if (entries.get(key) === entry) entries.delete(key);
      });
      return value;
    },
    invalidate() {
      generation++;
      stats.invalidations++;
      entries.clear();
    },
    stats: () => ({ ...stats, size: entries.size }),
  };
}
