import { z } from 'zod';
import { RUN_FILES } from '@/lib/desk/schemas';

export const reviewRunParams = z.object({ runId: z.coerce.number().int().positive({ message: 'must be a run number' }) });
export const reviewFileParams = reviewRunParams.extend({
  file: z.enum(RUN_FILES, { message: `must be one of ${RUN_FILES.join(', ')}` }),
});
