// People (administrators): list, change role, disable / enable.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { PersonUpdateBody } from '@/shared/api/people';
import { callEndpoint } from './api-client';

export const peopleKeys = {
  all: ['people'] as const,
  list: () => [...peopleKeys.all, 'list'] as const,
};

export function usePeopleQuery(enabled = true) {
  return useQuery({
    queryKey: peopleKeys.list(),
    queryFn: () => callEndpoint('people.list'),
    enabled,
  });
}

export function useUpdatePersonMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: PersonUpdateBody & { id: number }) => callEndpoint('people.update', { params: { id }, body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: peopleKeys.all }),
  });
}
