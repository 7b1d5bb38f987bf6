import { handler } from '@/lib/api/handler';
import { studyParamsSchema } from '@/lib/assignments/schema';
import { requireLedStudy } from '@/lib/assignments/lead-rules';
import { listOverdue } from '@/lib/db/queries/overdue';

// GET /api/studies/:id/overdue – assignments of the study past their due date and not submitted (leads of the study, admins)
export const GET = handler({ permission: 'runs.manage', params: studyParamsSchema }, async ({ user, params }) => {
  await requireLedStudy({ user, studyId: params.id });
  return { overdue: await listOverdue({ studyId: params.id }) };
});
