import { handler } from '@/lib/api/handler';
import { addRaterSchema, runDueSchema, runParamsSchema } from '@/lib/assignments/schema';
import { auditAddress } from '@/lib/auth/client-address';
import { addRaterToRun } from '@/lib/assignments/add-rater';
import { setRunDue } from '@/lib/assignments/set-due';

// POST /api/runs/:id/assignments – a lead adds a rater of the study to the run (decisions recomputed)
export const POST = handler(
  { permission: 'runs.manage', params: runParamsSchema, body: addRaterSchema, what: 'The assignment' },
  async ({ req, user, params, body }) =>
    addRaterToRun({ user, runId: params.id, raterId: body.raterId, dueAt: body.dueAt, ip: auditAddress(req) }),
);

// PATCH /api/runs/:id/assignments – one due date for every open assignment of the run
export const PATCH = handler(
  { permission: 'runs.manage', params: runParamsSchema, body: runDueSchema, what: 'The due date' },
  async ({ req, user, params, body }) => setRunDue({ user, runId: params.id, dueAt: body.dueAt, ip: auditAddress(req) }),
);
