import { handler } from '@/lib/api/handler';
import { studyParamsSchema } from '@/lib/calibration/schema';
import { listCalibration } from '@/lib/calibration/list-calibration';

// GET /api/studies/:id/calibration – the calibration set: runs with reference status, assigned raters, scores and certifications (leads of the study, admins)
export const GET = handler({ permission: 'calibration.manage', params: studyParamsSchema }, async ({ user, params }) =>
  listCalibration({ user, studyId: params.id }),
);
