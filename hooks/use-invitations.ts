// Invitations: administrators invite by e-mail with a role; the invitee opens the link, sees the
// invited address and role, and accepts by setting a display name and a password.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { InvitationAcceptBody, InvitationCreateBody } from '@/shared/api/invitations';
import { callEndpoint } from './api-client';
import { outboxKeys } from './use-outbox';
import { peopleKeys } from './use-people';

export const invitationKeys = {
  all: ['invitations'] as const,
  list: () => [...invitationKeys.all, 'list'] as const,
  byToken: (token: string) => [...invitationKeys.all, 'token', token] as const,
};

export function useInvitationsQuery(enabled = true) {
  return useQuery({
    queryKey: invitationKeys.list(),
    queryFn: () => callEndpoint('invitations.list'),
    enabled,
  });
}

/** What an invitation link is for (public). A bad link gives ApiError INVALID_TOKEN. */
export function useInvitationByTokenQuery(token: string | undefined) {
  return useQuery({
    queryKey: invitationKeys.byToken(token ?? ''),
    queryFn: () => callEndpoint('invitations.lookup', { params: { token: token ?? '' } }),
    enabled: !!token,
    retry: false,
  });
}

export function useCreateInvitationMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: InvitationCreateBody) => callEndpoint('invitations.create', { body }),
    onSuccess: () => {
      qc.invalidateQueries({ queryKey: invitationKeys.all });
      // The invitation e-mail lands in the Outbox.
      qc.invalidateQueries({ queryKey: outboxKeys.all });
    },
  });
}

export function useRevokeInvitationMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => callEndpoint('invitations.revoke', { params: { id } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: invitationKeys.all }),
  });
}

export function useAcceptInvitationMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: InvitationAcceptBody) => callEndpoint('invitations.accept', { body }),
    onSuccess: () => {
      // Not the link's own lookup: the link is used now, and asking again would only get a 400.
      qc.invalidateQueries({ queryKey: invitationKeys.list() });
      qc.invalidateQueries({ queryKey: peopleKeys.all });
    },
  });
}
