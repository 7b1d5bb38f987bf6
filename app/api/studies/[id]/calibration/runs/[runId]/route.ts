import { handler } from '@/lib/api/handler';
import { auditAddress } from '@/lib/auth/client-address';
import { calibrationRunParamsSchema } from '@/lib/calibration/schema';
import { unmarkCalibrationRun } from '@/lib/calibration/unmark-calibration-run';

// DELETE /api/studies/:id/calibration/runs/:runId – take a run out of the calibration set (references, votes and history kept)
export const DELETE = handler(
  { permission: 'calibration.manage', params: calibrationRunParamsSchema, what: 'The calibration run' },
  async ({ req, user, params }) => unmarkCalibrationRun({ user, studyId: params.id, runId: params.runId, ip: auditAddress(req) }),
);
