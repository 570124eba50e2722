// Transfer studies: run one for a track and period (admin, engineer, planner), save it, and list /
// read the saved ones.
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { StudySaveBody } from '@/shared/api/studies';
import { callEndpoint } from './api-client';

export interface StudyRequest {
  track: string;
  from: string;
  to: string;
}

export const studyKeys = {
  all: ['studies'] as const,
  run: (q: StudyRequest) => [...studyKeys.all, 'run', q.track, q.from, q.to] as const,
  saved: () => [...studyKeys.all, 'saved'] as const,
  savedOne: (id: number) => [...studyKeys.saved(), id] as const,
};

export function useTransferStudyQuery(q: StudyRequest | null) {
  return useQuery({
    queryKey: studyKeys.run(q ?? { track: '', from: '', to: '' }),
    queryFn: () => callEndpoint('studies.transfer', { query: { track: q?.track, from: q?.from, to: q?.to } }),
    enabled: !!q?.track && !!q.from && !!q.to,
    placeholderData: keepPreviousData,
    staleTime: 60_000,
  });
}

export function useSavedStudiesQuery() {
  return useQuery({ queryKey: studyKeys.saved(), queryFn: () => callEndpoint('studies.list') });
}

export function useSavedStudyQuery(id: number | null | undefined) {
  const ok = id != null && Number.isInteger(id) && id > 0;
  return useQuery({
    queryKey: studyKeys.savedOne(ok ? id : 0),
    queryFn: () => callEndpoint('studies.get', { params: { id: id ?? 0 } }),
    enabled: ok,
  });
}

export function useSaveStudyMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: StudySaveBody) => callEndpoint('studies.save', { body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: studyKeys.saved() }),
  });
}
