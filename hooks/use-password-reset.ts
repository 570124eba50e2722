// Password reset: request a link by e-mail, then set a new password with the link's token.
import { useMutation } from '@tanstack/react-query';
import type { PasswordResetCompleteBody, PasswordResetRequestBody } from '@/shared/api/password-reset';
import { callEndpoint } from './api-client';

/** Mutations only; keys name them (for devtools and useIsMutating). */
export const passwordResetKeys = {
  all: ['password-reset'] as const,
  request: () => [...passwordResetKeys.all, 'request'] as const,
  complete: () => [...passwordResetKeys.all, 'complete'] as const,
};

export function useRequestPasswordResetMutation() {
  return useMutation({
    mutationKey: passwordResetKeys.request(),
    mutationFn: (body: PasswordResetRequestBody) => callEndpoint('passwordReset.request', { body }),
  });
}

export function useCompletePasswordResetMutation() {
  return useMutation({
    mutationKey: passwordResetKeys.complete(),
    mutationFn: (body: PasswordResetCompleteBody) => callEndpoint('passwordReset.complete', { body }),
  });
}
