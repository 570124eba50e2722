// The signed-in person (GET /api/auth/me), sign-in and sign-out.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { MeResponse, SignInBody } from '@/shared/api/auth';
import type { Permission } from '@/shared/roles';
import { ApiError, callEndpoint, resetCsrfToken, setCsrfToken } from './api-client';

export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
};

/**
 * The current person; an ApiError with code UNAUTHENTICATED (401) means "not signed in".
 * `enabled: false` reads only what is cached (the signed-out screens, which need no request).
 */
export function useMeQuery(opts: { enabled?: boolean } = {}) {
  return useQuery({
    queryKey: authKeys.me(),
    enabled: opts.enabled ?? true,
    queryFn: async () => {
      // Ask the public CSRF endpoint first, so that a signed-out visit makes no failing request.
      const probe = await callEndpoint('auth.csrf');
      if (!probe.signedIn) {
        setCsrfToken(probe.csrfToken);
        throw new ApiError('UNAUTHENTICATED', 'Sign in to continue.', 401);
      }
      const me = await callEndpoint('auth.me');
      setCsrfToken(me.csrfToken);
      return me;
    },
    staleTime: 60_000,
    // A 401 or 403 is an answer, not a glitch: do not retry it.
    retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 2,
  });
}

/**
 * True when /me says nobody is signed in (401) or the account is disabled. Check this before
 * `data`: after a session ends, TanStack Query keeps the last good answer next to the error.
 */
export function isSignedOut(err: unknown): boolean {
  return err instanceof ApiError && (err.code === 'UNAUTHENTICATED' || err.code === 'ACCOUNT_DISABLED');
}

/** Whether the signed-in person holds a permission (the server's answer, the §5.3 table). */
export function useCan(): (p: Permission) => boolean {
  const q = useMeQuery();
  const me = isSignedOut(q.error) ? undefined : q.data;
  return (p) => !!me?.permissions.includes(p);
}

export function useSignInMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SignInBody) => callEndpoint('auth.signIn', { body }),
    onSuccess: (me: MeResponse) => {
      // Sign-in rotates the session: the old token is dead, the answer carries the new one.
      setCsrfToken(me.csrfToken);
      // Drop what an earlier person could see; queries still on screen (an invitation being
      // accepted) stay, or they would refetch needlessly.
      qc.removeQueries({ type: 'inactive', predicate: (q) => q.queryKey[0] !== authKeys.all[0] });
      qc.setQueryData(authKeys.me(), me);
    },
  });
}

export function useSignOutMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => callEndpoint('auth.signOut'),
    onSettled: () => {
      // Whatever the answer, forget everything the session could see.
      resetCsrfToken();
      qc.clear();
    },
  });
}
