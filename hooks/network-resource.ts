// Shared plumbing for the six network resources (areas, sites, PMUs, channels, corridors, mode
// tracks): list, create, update (PATCH), delete, each through its entry in the API catalogue.
// Each resource file builds its own key factory and hooks from this. Keys sit under
// networkKeys.all because the resources reference each other (deleting a site changes which
// channels exist), so any change refreshes the whole model.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { callEndpoint } from './api-client';
import { networkKeys } from './use-network';

export type NetworkResourceName = 'areas' | 'sites' | 'pmus' | 'channels' | 'corridors' | 'tracks';

export function resourceKeys<N extends NetworkResourceName>(name: N) {
  const all = [...networkKeys.all, name] as const;
  return {
    all,
    list: () => [...all, 'list'] as const,
  };
}

export function makeResourceHooks<N extends NetworkResourceName, C, U>(name: N, keys: ReturnType<typeof resourceKeys<N>>) {
  /** `refetchInterval` (ms) for screens that show live state, e.g. Watch's latest estimates. */
  const useListQuery = (opts: { refetchInterval?: number } = {}) =>
    useQuery({
      queryKey: keys.list(),
      queryFn: () => callEndpoint(`${name}.list`),
      refetchInterval: opts.refetchInterval,
    });

  const useCreateMutation = () => {
    const qc = useQueryClient();
    return useMutation({
      mutationFn: (body: C) => callEndpoint(`${name}.create`, { body }),
      onSuccess: () => qc.invalidateQueries({ queryKey: networkKeys.all }),
    });
  };

  const useUpdateMutation = () => {
    const qc = useQueryClient();
    return useMutation({
      mutationFn: ({ id, body }: { id: number; body: U }) => callEndpoint(`${name}.update`, { params: { id }, body }),
      onSuccess: () => qc.invalidateQueries({ queryKey: networkKeys.all }),
    });
  };

  const useDeleteMutation = () => {
    const qc = useQueryClient();
    return useMutation({
      mutationFn: (id: number) => callEndpoint(`${name}.remove`, { params: { id } }),
      onSuccess: () => qc.invalidateQueries({ queryKey: networkKeys.all }),
    });
  };

  return { useListQuery, useCreateMutation, useUpdateMutation, useDeleteMutation };
}
