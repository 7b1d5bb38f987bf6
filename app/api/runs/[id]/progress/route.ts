import { handler } from '@/lib/api/handler';
import { runIdParams } from '@/lib/runs/schema';
import { runProgress } from '@/lib/runs/actions';

// GET /api/runs/:id/progress – the run's status and its latest decompose job (stage, percent, message)
export const GET = handler({ permission: 'runs.read', params: runIdParams }, async ({ user, params }) =>
  runProgress({ user, runId: params.id }),
);
