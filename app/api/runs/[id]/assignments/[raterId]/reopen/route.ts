import { handler } from '@/lib/api/handler';
import { reopenSchema, runRaterParamsSchema } from '@/lib/assignments/schema';
import { auditAddress } from '@/lib/auth/client-address';
import { reopenAssignment } from '@/lib/assignments/reopen-assignment';

// POST /api/runs/:id/assignments/:raterId/reopen – a lead lets a rater change their submitted votes (audited with a reason)
export const POST = handler(
  { permission: 'runs.manage', params: runRaterParamsSchema, body: reopenSchema, what: 'The reopening' },
  async ({ req, user, params, body }) =>
    reopenAssignment({ user, runId: params.id, raterId: params.raterId, reason: body.reason, ip: auditAddress(req) }),
);
