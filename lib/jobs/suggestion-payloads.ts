/** Payloads of the `train-suggestions` and `score-suggestions` job kinds (zod only). */
import { z } from 'zod';

export const trainSuggestionsPayloadSchema = z
  .object({
    /** The study the model is for (its suggestions, its version numbers). */
    studyId: z.number().int().positive(),
    /** Studies whose released decisions train it (the study itself, or every study a lead selects). */
    sourceStudyIds: z.array(z.number().int().positive()).min(1).max(200),
  })
  .strict();

export const scoreSuggestionsPayloadSchema = z
  .object({
    studyId: z.number().int().positive(),
    /** One run; without it every ready run of the study. */
    runId: z.number().int().positive().optional(),
  })
  .strict();
