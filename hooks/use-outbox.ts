// The Outbox (administrators): messages the local e-mail sink received.
import { useQuery } from '@tanstack/react-query';
import { callEndpoint } from './api-client';

export const outboxKeys = {
  all: ['outbox'] as const,
  list: (to?: string) => [...outboxKeys.all, 'list', to ?? ''] as const,
  message: (id: number) => [...outboxKeys.all, 'message', id] as const,
};

export function useOutboxQuery(to?: string, enabled = true) {
  return useQuery({
    queryKey: outboxKeys.list(to),
    queryFn: () => callEndpoint('outbox.list', { query: { to } }),
    enabled,
    // New messages arrive from the server's mail sink without any action here.
    refetchInterval: 15_000,
  });
}

export function useOutboxMessageQuery(id: number | undefined) {
  return useQuery({
    queryKey: outboxKeys.message(id ?? 0),
    queryFn: () => callEndpoint('outbox.get', { params: { id: id ?? 0 } }),
    enabled: id != null && Number.isFinite(id) && id > 0,
  });
}
