import { handler } from '@/lib/api/handler';
import { mapsParamsSchema } from '@/lib/desk/schemas';
import { requireAssignedRun } from '@/lib/runs/assigned-run';
import { deskMapsResponse } from '@/lib/desk/map-response';

// GET /api/runs/:id/maps/:part – the desk's map payload, `layout` or a range of maps such as `1-8` (assigned rater only)
export const GET = handler(
  { permission: 'votes.write', params: mapsParamsSchema, what: 'The map payload' },
  async ({ req, user, params }) => {
    const run = await requireAssignedRun({ user, runId: params.id });
    return deskMapsResponse(req, {
      runId: params.id,
      decompositionId: run.decompositionId as number,
      componentsKey: (run.componentsKey as string | null) ?? null,
      maskKey: (run.maskKey as string | null) ?? null,
      part: params.part,
    });
  },
);
