// A track's estimates over a period (Trends; raw points for short spans, buckets for long ones:
// the server aggregates above maxPoints), one estimate with its mode shape, and the CSV link.
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { buildPath } from '@/shared/api/common';
import { ENDPOINTS } from '@/shared/api/endpoints';
import { callEndpoint } from './api-client';

export interface EstimatesWindow {
  /** ISO-8601 UTC. */
  from: string;
  to: string;
  /** Above this many estimates the server returns buckets (min / mean / max). */
  maxPoints?: number;
}

export const estimateKeys = {
  all: ['estimates'] as const,
  track: (code: string, w: EstimatesWindow) => [...estimateKeys.all, 'track', code, w.from, w.to, w.maxPoints ?? 1000] as const,
  detail: (id: number) => [...estimateKeys.all, 'detail', id] as const,
};

export function useTrackEstimatesQuery(code: string | null | undefined, w: EstimatesWindow | null) {
  return useQuery({
    queryKey: estimateKeys.track(code ?? '', w ?? { from: '', to: '' }),
    queryFn: () =>
      callEndpoint('estimates.list', {
        params: { code: code ?? '' },
        query: { from: w?.from, to: w?.to, maxPoints: w?.maxPoints },
      }),
    enabled: !!code && !!w,
    // Zooming and panning fetch a new span; keep drawing the old one until it arrives.
    placeholderData: keepPreviousData,
    staleTime: 30_000,
  });
}

export function useEstimateQuery(id: number | null | undefined) {
  const ok = id != null && Number.isInteger(id) && id > 0;
  return useQuery({
    queryKey: estimateKeys.detail(ok ? id : 0),
    queryFn: () => callEndpoint('estimates.get', { params: { id: id ?? 0 } }),
    enabled: ok,
    staleTime: 5 * 60_000,
  });
}

/** Same-origin link to the server's CSV export of a track's estimates over [from, to]. */
export function estimatesCsvUrl(code: string, from: string, to: string): string {
  const base = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');
  return `${base}${buildPath(ENDPOINTS['estimates.csv'].path, { code })}?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`;
}
