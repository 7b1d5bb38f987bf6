import { z } from 'zod';
import { ROLES } from '@/lib/vocabulary/roles';

/** A change of a person's access: a new facility role and/or active flag. */
export const accessChangeSchema = z
  .object({
    role: z.enum(ROLES, { message: 'Choose a role.' }).optional(),
    active: z.boolean().optional(),
  })
  .refine((v) => v.role !== undefined || v.active !== undefined, { message: 'Send a role or an active flag.' });
export type AccessChange = z.input<typeof accessChangeSchema>;

export const userIdParams = z.object({ id: z.coerce.number().int().positive() });
