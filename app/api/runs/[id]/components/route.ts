import { handler } from '@/lib/api/handler';
import { runParamsSchema } from '@/lib/desk/schemas';
import { loadDeskComponents } from '@/lib/runs/load-desk-components';

// GET /api/runs/:id/components – the run's components for its assigned rater (no votes of anyone)
export const GET = handler({ permission: 'votes.write', params: runParamsSchema, what: 'The run' }, async ({ user, params }) => {
  const payload = await loadDeskComponents({ user, runId: params.id });
  return Response.json(payload, { headers: { 'Cache-Control': 'private, no-store' } });
});
