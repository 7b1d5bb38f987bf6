import { handler } from '@/lib/api/handler';
import { deleteRunQuerySchema, runEntitiesSchema, runIdParams } from '@/lib/runs/schema';
import { deleteRun } from '@/lib/runs/actions';
import { editRunEntities } from '@/lib/runs/edit-run-entities';
import { findRunForUser } from '@/lib/db/queries/runs';
import { listRunsForStudy } from '@/lib/runs/list-study-runs';
import { auditAddress } from '@/lib/auth/client-address';
import { notFound } from '@/lib/errors';

// GET /api/runs/:id – one run as a runs-table row (raters: only runs assigned to them)
export const GET = handler({ permission: 'runs.read', params: runIdParams }, async ({ user, params }) => {
  const run = await findRunForUser({ user, runId: params.id });
  if (!run) throw notFound('The run');
  const [row] = await listRunsForStudy({ user, studyId: run.studyId, runId: run.id });
  return { run: row };
});

// PATCH /api/runs/:id – correct the run's BIDS entities (refused once released, or when another run has them)
export const PATCH = handler(
  { permission: 'runs.manage', params: runIdParams, body: runEntitiesSchema, what: 'The label change' },
  async ({ req, user, params, body }) => ({
    run: await editRunEntities({ user, runId: params.id, entities: body, ip: auditAddress(req) }),
  }),
);

// DELETE /api/runs/:id[?confirmVotes=true] – delete a run; one with votes needs the second confirmation
export const DELETE = handler(
  { permission: 'runs.manage', params: runIdParams, query: deleteRunQuerySchema },
  async ({ user, params, query }) => deleteRun({ user, runId: params.id, confirmVotes: query.confirmVotes }),
);
