import { handler } from '@/lib/api/handler';
import { studyParamsSchema } from '@/lib/calibration/schema';
import { myCalibration } from '@/lib/calibration/my-calibration';

// GET /api/studies/:id/calibration/me – the caller's own calibration score (submitted calibration runs only) and certification
export const GET = handler({ permission: 'votes.write', params: studyParamsSchema }, async ({ user, params }) =>
  myCalibration({ user, studyId: params.id }),
);
