import { handler } from '@/lib/api/handler';
import { auditAddress } from '@/lib/auth/client-address';
import { markRunSchema, studyParamsSchema } from '@/lib/calibration/schema';
import { markCalibrationRun } from '@/lib/calibration/mark-calibration-run';

// POST /api/studies/:id/calibration/runs – mark a ready run of the study as a calibration run
export const POST = handler(
  { permission: 'calibration.manage', params: studyParamsSchema, body: markRunSchema, what: 'The calibration run' },
  async ({ req, user, params, body }) => markCalibrationRun({ user, studyId: params.id, runId: body.runId, ip: auditAddress(req) }),
);
