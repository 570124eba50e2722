// People (administrators only): list, change role, disable / enable.
import { z } from 'zod';
import { roleSchema } from '../roles';
import { personSchema } from './auth';

export { personSchema, type Person } from './auth';

export const peopleListResponseSchema = z.object({ people: z.array(personSchema) });
export type PeopleListResponse = z.infer<typeof peopleListResponseSchema>;

export const personUpdateBodySchema = z
  .object({
    role: roleSchema.optional(),
    disabled: z.boolean({ error: 'disabled must be true or false' }).optional(),
  })
  .strict()
  .refine((b) => b.role !== undefined || b.disabled !== undefined, {
    error: 'Give a role or disabled (or both)',
  });
export type PersonUpdateBody = z.infer<typeof personUpdateBodySchema>;

export const personResponseSchema = z.object({ person: personSchema });
export type PersonResponse = z.infer<typeof personResponseSchema>;
