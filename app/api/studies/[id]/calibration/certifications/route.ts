import { handler } from '@/lib/api/handler';
import { auditAddress } from '@/lib/auth/client-address';
import { certifySchema, studyParamsSchema } from '@/lib/calibration/schema';
import { certifyRater } from '@/lib/calibration/certify-rater';

// POST /api/studies/:id/calibration/certifications – the lead certifies a rater (passed or not); their scores now are stored with it
export const POST = handler(
  { permission: 'calibration.manage', params: studyParamsSchema, body: certifySchema, what: 'The certification' },
  async ({ req, user, params, body }) =>
    certifyRater({ user, studyId: params.id, userId: body.userId, passed: body.passed, ip: auditAddress(req) }),
);
