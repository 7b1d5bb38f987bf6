import { handler } from '@/lib/api/handler';
import { deleteRunQuerySchema, runIdParams } from '@/lib/runs/schema';
import { deleteRun } from '@/lib/runs/actions';
import { findRunForUser, listRunsForStudy } from '@/lib/db/queries/runs';
import { notFound } from '@/lib/errors';

// GET /api/runs/:id – one run as a runs-table row (raters: only runs assigned to them)
export const GET = handler({ permission: 'runs.read', params: runIdParams }, async ({ user, params }) => {
  const run = await findRunForUser({ user, runId: params.id });
  if (!run) throw notFound('The run');
  const [row] = await listRunsForStudy({ user, studyId: run.studyId, runId: run.id });
  return { run: row };
});

// DELETE /api/runs/:id[?confirmVotes=true] – delete a run; one with votes needs the second confirmation
export const DELETE = handler({ permission: 'runs.manage', params: runIdParams, query: deleteRunQuerySchema }, async ({ user, params, query }) =>
  deleteRun({ user, runId: params.id, confirmVotes: query.confirmVotes }),
);
