import { z } from 'zod';
import { wellFormed } from '@/lib/text';

export const createReleaseSchema = z.object({
  /** Release one run instead of the whole study. */
  runId: z.coerce.number().int().positive().optional(),
  notes: z
    .string()
    .trim()
    .max(2000)
    .refine(...wellFormed('The notes'))
    .optional(),
});
