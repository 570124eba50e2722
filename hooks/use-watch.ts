// Watch: every mode track's latest estimate, 24-hour sparkline, open alerts and staleness
// (GET /api/watch). Refreshes by itself every 30 s; live events (use-events.ts) refresh it sooner.
import { useQuery } from '@tanstack/react-query';
import { callEndpoint } from './api-client';

export const watchKeys = {
  all: ['watch'] as const,
  board: () => [...watchKeys.all, 'board'] as const,
};

/** How often Watch refetches without any live event, ms. */
export const WATCH_REFRESH_MS = 30_000;

export function useWatchQuery() {
  return useQuery({
    queryKey: watchKeys.board(),
    queryFn: () => callEndpoint('watch.get'),
    refetchInterval: WATCH_REFRESH_MS,
    // A wall display keeps refreshing even when the tab is not focused.
    refetchIntervalInBackground: true,
  });
}
