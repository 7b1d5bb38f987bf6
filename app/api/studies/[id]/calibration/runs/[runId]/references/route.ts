import { handler } from '@/lib/api/handler';
import { auditAddress } from '@/lib/auth/client-address';
import { calibrationRunParamsSchema, referenceSchema } from '@/lib/calibration/schema';
import { adoptReferences } from '@/lib/calibration/adopt-references';
import { setReferenceLabel } from '@/lib/calibration/set-reference-label';

// POST /api/studies/:id/calibration/runs/:runId/references – adopt the run's decisions as reference ({ adopt: true }) or set one component's reference label
export const POST = handler(
  { permission: 'calibration.manage', params: calibrationRunParamsSchema, body: referenceSchema, what: 'The reference label' },
  async ({ req, user, params, body }) => {
    const ip = auditAddress(req);
    if ('adopt' in body) return adoptReferences({ user, studyId: params.id, runId: params.runId, ip });
    return setReferenceLabel({
      user,
      studyId: params.id,
      runId: params.runId,
      componentId: body.componentId,
      label: body.label,
      noiseKind: body.noiseKind,
      ip,
    });
  },
);
