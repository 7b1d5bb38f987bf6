import { handler } from '@/lib/api/handler';
import { auditAddress } from '@/lib/auth/client-address';
import { assignCalibrationSchema, calibrationRunParamsSchema } from '@/lib/calibration/schema';
import { assignCalibrationRater } from '@/lib/calibration/assign-calibration-rater';

// POST /api/studies/:id/calibration/runs/:runId/raters – assign a rater to a calibration run (they rate it in the normal desk)
export const POST = handler(
  { permission: 'calibration.manage', params: calibrationRunParamsSchema, body: assignCalibrationSchema, what: 'The assignment' },
  async ({ req, user, params, body }) =>
    assignCalibrationRater({ user, studyId: params.id, runId: params.runId, raterId: body.raterId, ip: auditAddress(req) }),
);
