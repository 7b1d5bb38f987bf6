import { z } from 'zod';
import { RUN_FILES, mapPartSchema } from '@/lib/desk/schemas';

export const reconcileRunParams = z.object({ runId: z.coerce.number().int().positive({ message: 'must be a run number' }) });
export const reconcileFileParams = reconcileRunParams.extend({
  file: z.enum(RUN_FILES, { message: `must be one of ${RUN_FILES.join(', ')}` }),
});
/** GET /api/reconcile/runs/:runId/maps/:part — the map payload (lib/desk/map-payload.ts) for the lead reconciling the run. */
export const reconcileMapsParams = reconcileRunParams.extend({ part: mapPartSchema });
