import { z } from 'zod';
import { RUN_FILES } from '@/lib/desk/schemas';

export const reconcileRunParams = z.object({ runId: z.coerce.number().int().positive({ message: 'must be a run number' }) });
export const reconcileFileParams = reconcileRunParams.extend({
  file: z.enum(RUN_FILES, { message: `must be one of ${RUN_FILES.join(', ')}` }),
});
