import { handler } from '@/lib/api/handler';
import { changeThreshold, readThreshold } from '@/lib/calibration/change-threshold';
import { calibrationThresholdSchema, studyParamsSchema } from '@/lib/calibration/schema';

// GET /api/studies/:id/calibration/threshold – AC1 and noise sensitivity a rater must reach on the calibration set before live runs (null: no gate)
export const GET = handler({ permission: 'calibration.manage', params: studyParamsSchema, what: 'The study' }, async ({ user, params }) =>
  readThreshold({ user, studyId: params.id }),
);

// PUT /api/studies/:id/calibration/threshold – { minAc1, minSensitivity } (leads of the study)
export const PUT = handler(
  { permission: 'calibration.manage', params: studyParamsSchema, body: calibrationThresholdSchema, what: 'The study' },
  async ({ user, params, body }) => changeThreshold({ user, studyId: params.id, threshold: body }),
);
