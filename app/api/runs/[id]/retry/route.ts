import { handler } from '@/lib/api/handler';
import { runIdParams } from '@/lib/runs/schema';
import { retryRun } from '@/lib/runs/actions';

// POST /api/runs/:id/retry – queue a failed or cancelled run again
export const POST = handler({ permission: 'runs.manage', params: runIdParams }, async ({ user, params }) => ({
  run: await retryRun({ user, runId: params.id }),
}));
