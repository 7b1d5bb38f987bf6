import { handler } from '@/lib/api/handler';
import { mapsParamsSchema } from '@/lib/desk/schemas';
import { loadRunForViewing } from '@/lib/runs/load-run-for-viewing';
import { deskMapsResponse } from '@/lib/desk/map-response';
import { AppError } from '@/lib/errors';

// GET /api/runs/:id/view/maps/:part – the map payload for the read-only run view (the study's leads and observers)
export const GET = handler(
  { permission: 'runs.read', params: mapsParamsSchema, what: 'The map payload' },
  async ({ req, user, params }) => {
    const loaded = await loadRunForViewing({ user, runId: params.id });
    if (!loaded) throw new AppError('not_found', `Run ${params.id} is not a ready run of a study you lead or observe.`);
    return deskMapsResponse(req, {
      runId: params.id,
      decompositionId: loaded.run.decompositionId,
      componentsKey: loaded.files['components.nii.gz'] ?? null,
      maskKey: loaded.files['mask.nii.gz'] ?? null,
      part: params.part,
    });
  },
);
