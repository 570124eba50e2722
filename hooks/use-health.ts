// Server health (public): database, Redis and worker status. 503 still carries the same body.
import { useQuery } from '@tanstack/react-query';
import { callEndpoint } from './api-client';

export const healthKeys = {
  all: ['health'] as const,
  get: () => [...healthKeys.all, 'get'] as const,
};

export function useHealthQuery(refetchInterval = 30_000) {
  return useQuery({
    queryKey: healthKeys.get(),
    queryFn: () => callEndpoint('health.get'),
    refetchInterval,
  });
}
