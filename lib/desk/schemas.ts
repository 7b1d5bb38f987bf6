import { z } from 'zod';
import { wellFormed } from '@/lib/text';

/** Path parameters: /api/runs/:id/… */
export const runParamsSchema = z.object({ id: z.coerce.number().int().positive({ message: 'must be a run number' }) });
export const voteParamsSchema = runParamsSchema.extend({
  componentId: z.coerce.number().int().positive({ message: 'must be a component number' }),
});

/**
 * A vote change: only the fields the rater changed, plus the version the browser last saw
 * (0 for a new vote). Fields are merged on the server, last write per field wins.
 */
export const voteChangeSchema = z
  .object({
    label: z.string().trim().min(1).max(32).optional(),
    noiseKind: z.string().trim().min(1).max(32).nullable().optional(),
    confidence: z
      .number()
      .int()
      .min(1, { message: 'confidence is 1 (low) to 5 (high)' })
      .max(5, { message: 'confidence is 1 (low) to 5 (high)' })
      .nullable()
      .optional(),
    note: z
      .string()
      .max(2000, { message: 'a note holds at most 2000 characters' })
      .refine(...wellFormed('the note'))
      .nullable()
      .optional(),
    baseVersion: z.number().int().min(0),
  })
  .strict()
  .refine((v) => v.label !== undefined || v.noiseKind !== undefined || v.confidence !== undefined || v.note !== undefined, {
    message: 'send at least one of label, noiseKind, confidence, note',
  });
export type VoteChange = z.infer<typeof voteChangeSchema>;

/** PUT /api/runs/:id/desk — where the rater is. */
export const deskPositionSchema = z.object({ componentIdx: z.number().int().min(1) }).strict();

export const RUN_FILES = ['components.nii.gz', 'mean.nii.gz', 'mask.nii.gz', 'structural.nii.gz'] as const;
export const fileParamsSchema = runParamsSchema.extend({
  file: z.enum(RUN_FILES, { message: `must be one of ${RUN_FILES.join(', ')}` }),
});

/** GET /api/runs/:id/maps/:part — the desk's map payload: `layout`, or maps `<from>-<to>` (1-based, inclusive). */
export const mapPartSchema = z
  .string()
  .max(16)
  .regex(/^(layout|[1-9][0-9]{0,4}-[1-9][0-9]{0,4})$/, { message: 'must be "layout" or a component range such as 1-8' });
export const mapsParamsSchema = runParamsSchema.extend({ part: mapPartSchema });
