// Ambient scans: start one on a recording, read its windows and modes (polled while it runs).
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ScanCreateBody } from '@/shared/api/scans';
import { callEndpoint } from './api-client';
import { analysisKeys, isRunning, RUNNING_POLL_MS } from './use-analyses';

export const scanKeys = {
  all: ['scans'] as const,
  detail: (id: number) => [...scanKeys.all, 'detail', id] as const,
};

const validId = (id: number | null | undefined): id is number => id != null && Number.isFinite(id) && id > 0;

/** A scan's windows with their modes (:id is the analysis id); windows arrive while it runs. */
export function useScanQuery(id: number | null | undefined) {
  return useQuery({
    queryKey: scanKeys.detail(validId(id) ? id : 0),
    queryFn: () => callEndpoint('scans.get', { params: { id: id ?? 0 } }),
    enabled: validId(id),
    refetchInterval: (q) => (isRunning(q.state.data?.analysis) ? RUNNING_POLL_MS * 2 : false),
  });
}

export function useStartScanMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ recordingId, body }: { recordingId: number; body: ScanCreateBody }) =>
      callEndpoint('scans.create', { params: { id: recordingId }, body }),
    onSuccess: (res) => {
      qc.setQueryData(analysisKeys.detail(res.analysis.id), res);
      void qc.invalidateQueries({ queryKey: analysisKeys.lists() });
      void qc.invalidateQueries({ queryKey: scanKeys.all });
    },
  });
}
