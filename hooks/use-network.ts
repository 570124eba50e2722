// The whole network model in one answer (GET /api/network). Every network resource's keys live
// under networkKeys.all, so a change to any of them refreshes this too.
import { useQuery } from '@tanstack/react-query';
import { callEndpoint } from './api-client';

export const networkKeys = {
  all: ['network'] as const,
  model: () => [...networkKeys.all, 'model'] as const,
};

export function useNetworkQuery() {
  return useQuery({
    queryKey: networkKeys.model(),
    queryFn: () => callEndpoint('network.get'),
  });
}
