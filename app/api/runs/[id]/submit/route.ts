import { handler } from '@/lib/api/handler';
import { runParamsSchema } from '@/lib/desk/schemas';
import { submitRun } from '@/lib/runs/submit-run';
import { auditAddress as clientIp } from '@/lib/auth/client-address';

// POST /api/runs/:id/submit – the rater hands in the run (every component must be labelled)
export const POST = handler({ permission: 'votes.write', params: runParamsSchema, what: 'The submission' }, async ({ req, user, params }) =>
  submitRun({ user, runId: params.id, ip: clientIp(req) }),
);
