// Alerts: lists by state, one alert with its trace, shape, notifications and history, and
// acknowledge-with-note (admin, engineer, operator — the server enforces it).
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ALERT_STATES } from '@/shared/api/alerts';
import { callEndpoint } from './api-client';
import { watchKeys } from './use-watch';

export interface AlertListFilter {
  state?: (typeof ALERT_STATES)[number];
  track?: string;
  limit?: number;
}

export const alertKeys = {
  all: ['alerts'] as const,
  lists: () => [...alertKeys.all, 'list'] as const,
  list: (f: AlertListFilter) => [...alertKeys.lists(), f.state ?? '', f.track ?? '', f.limit ?? 100] as const,
  detail: (id: number) => [...alertKeys.all, 'detail', id] as const,
};

export function useAlertsQuery(f: AlertListFilter = {}) {
  return useQuery({
    queryKey: alertKeys.list(f),
    queryFn: () => callEndpoint('alerts.list', { query: { state: f.state, track: f.track, limit: f.limit } }),
    refetchInterval: 30_000,
    placeholderData: keepPreviousData,
  });
}

export function useAlertQuery(id: number | undefined) {
  const ok = id != null && Number.isInteger(id) && id > 0;
  return useQuery({
    queryKey: alertKeys.detail(ok ? id : 0),
    queryFn: () => callEndpoint('alerts.get', { params: { id: id ?? 0 } }),
    enabled: ok,
    refetchInterval: 30_000,
  });
}

export function useAcknowledgeAlertMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, note }: { id: number; note: string }) => callEndpoint('alerts.acknowledge', { params: { id }, body: { note } }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: alertKeys.all });
      void qc.invalidateQueries({ queryKey: watchKeys.all });
    },
  });
}
