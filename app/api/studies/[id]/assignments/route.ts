import { handler } from '@/lib/api/handler';
import { bulkDueSchema, studyParamsSchema } from '@/lib/assignments/schema';
import { auditAddress } from '@/lib/auth/client-address';
import { listStudyAssignments } from '@/lib/assignments/list-study-assignments';
import { setStudyDue } from '@/lib/assignments/set-due';

// GET /api/studies/:id/assignments – runs × assigned raters with progress, and the study's raters (leads of the study, admins)
export const GET = handler({ permission: 'runs.manage', params: studyParamsSchema }, async ({ user, params }) =>
  listStudyAssignments({ user, studyId: params.id }),
);

// PATCH /api/studies/:id/assignments – one due date for the open assignments of many runs
export const PATCH = handler(
  { permission: 'runs.manage', params: studyParamsSchema, body: bulkDueSchema, what: 'The due date' },
  async ({ req, user, params, body }) =>
    setStudyDue({ user, studyId: params.id, runIds: body.runIds, dueAt: body.dueAt, ip: auditAddress(req) }),
);
