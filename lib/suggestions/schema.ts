/** Zod schemas of the suggestion routes (shared by the pages and the route handlers). */
import { z } from 'zod';

export const suggestionStudyParamsSchema = z.object({
  id: z.coerce.number({ message: 'Choose a study.' }).int().positive({ message: 'Choose a study.' }),
});

/** PATCH /api/studies/:id/suggestions — show suggestions to raters (after their own vote) or not. */
export const suggestionSettingsSchema = z
  .object({ enabled: z.boolean({ message: 'Say whether raters see suggestions (true or false).' }) })
  .strict();

/** POST /api/studies/:id/suggestions/train — train from this study's releases, or from the studies listed. */
export const trainRequestSchema = z
  .object({
    sourceStudyIds: z
      .array(z.number().int().positive())
      .min(1, { message: 'Choose at least one study to learn from.' })
      .max(200)
      .optional(),
  })
  .strict();
