import { handler } from '@/lib/api/handler';
import { loadRunForReconcile } from '@/lib/consensus/load-run-for-reconcile';
import { reconcileMapsParams } from '@/lib/consensus/reconcile-params';
import { deskMapsResponse } from '@/lib/desk/map-response';

// GET /api/reconcile/runs/:runId/maps/:part – the map payload (`layout` or a range such as `1-8`) for the lead reconciling the run
export const GET = handler(
  { permission: 'decisions.reconcile', params: reconcileMapsParams, what: 'The map payload' },
  async ({ req, user, params }) => {
    const { run, files } = await loadRunForReconcile({ user, runId: params.runId });
    return deskMapsResponse(req, {
      runId: params.runId,
      decompositionId: run.decompositionId,
      componentsKey: files['components.nii.gz'] ?? null,
      maskKey: files['mask.nii.gz'] ?? null,
      part: params.part,
    });
  },
);
