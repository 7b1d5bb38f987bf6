import { handler } from '@/lib/api/handler';
import { changeAssignmentSchema, removeRaterQuerySchema, runRaterParamsSchema } from '@/lib/assignments/schema';
import { auditAddress } from '@/lib/auth/client-address';
import { reassignRun } from '@/lib/assignments/reassign-run';
import { removeRaterFromRun } from '@/lib/assignments/remove-rater';
import { setRunDue } from '@/lib/assignments/set-due';

// PATCH /api/runs/:id/assignments/:raterId – reassign the rater's place to another rater, and/or set this rater's due date
export const PATCH = handler(
  { permission: 'runs.manage', params: runRaterParamsSchema, body: changeAssignmentSchema, what: 'The assignment' },
  async ({ req, user, params, body }) => {
    const ip = auditAddress(req);
    if (body.replaceWith !== undefined) {
      return reassignRun({
        user,
        runId: params.id,
        fromRaterId: params.raterId,
        toRaterId: body.replaceWith,
        dueAt: body.dueAt,
        confirm: body.confirm,
        ip,
      });
    }
    return setRunDue({ user, runId: params.id, raterId: params.raterId, dueAt: body.dueAt ?? null, ip });
  },
);

// DELETE /api/runs/:id/assignments/:raterId?confirm=1 – remove the rater from the run (confirm when they have votes)
export const DELETE = handler(
  { permission: 'runs.manage', params: runRaterParamsSchema, query: removeRaterQuerySchema },
  async ({ req, user, params, query }) =>
    removeRaterFromRun({ user, runId: params.id, raterId: params.raterId, confirm: query.confirm, ip: auditAddress(req) }),
);
