// Ring-down fits: start one over an interval (both Prony and the matrix pencil), read both
// methods' modes and reconstructions (polled until done), and the CSV export's address.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { buildPath } from '@/shared/api/common';
import { ENDPOINTS } from '@/shared/api/endpoints';
import type { FitCreateBody } from '@/shared/api/fits';
import { callEndpoint } from './api-client';
import { analysisKeys, isRunning, RUNNING_POLL_MS } from './use-analyses';

export const fitKeys = {
  all: ['fits'] as const,
  detail: (id: number) => [...fitKeys.all, 'detail', id] as const,
};

const validId = (id: number | null | undefined): id is number => id != null && Number.isFinite(id) && id > 0;

/** A fit (:id is the analysis id): empty `methods` until it is done. */
export function useFitQuery(id: number | null | undefined) {
  return useQuery({
    queryKey: fitKeys.detail(validId(id) ? id : 0),
    queryFn: () => callEndpoint('fits.get', { params: { id: id ?? 0 } }),
    enabled: validId(id),
    staleTime: 60_000,
    refetchInterval: (q) => (isRunning(q.state.data?.analysis) ? RUNNING_POLL_MS : false),
  });
}

export function useStartFitMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ recordingId, body }: { recordingId: number; body: FitCreateBody }) =>
      callEndpoint('fits.create', { params: { id: recordingId }, body }),
    onSuccess: (res) => {
      qc.setQueryData(analysisKeys.detail(res.analysis.id), res);
      void qc.invalidateQueries({ queryKey: analysisKeys.lists() });
      void qc.invalidateQueries({ queryKey: fitKeys.all });
    },
  });
}

const BASE = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');

/** Where the fit's CSV export is served (a plain link: the browser downloads it with the session cookie). */
export function fitCsvUrl(id: number): string {
  return `${BASE}${buildPath(ENDPOINTS['fits.csv'].path, { id })}`;
}
