import { z } from 'zod';
import { newPasswordSchema } from '@/shared/api/common';

/** New password typed twice; the shared policy applies to the first, the second must match. */
export const passwordPairShape = {
  password: newPasswordSchema,
  repeat: z.string(),
};

export function passwordsMatch(v: { password: string; repeat: string }): boolean {
  return v.password === v.repeat;
}

export const MISMATCH = { path: ['repeat'], error: 'The two passwords are not the same' };
