import { handler } from '@/lib/api/handler';
import { runIdParams } from '@/lib/runs/schema';
import { cancelRun } from '@/lib/runs/actions';

// POST /api/runs/:id/cancel – cancel a queued or processing run
export const POST = handler({ permission: 'runs.manage', params: runIdParams }, async ({ user, params }) => ({
  run: await cancelRun({ user, runId: params.id }),
}));
