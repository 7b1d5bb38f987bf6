import { handler } from '@/lib/api/handler';
import { runParamsSchema } from '@/lib/desk/schemas';
import { showSuggestions } from '@/lib/suggestions/show-suggestions';

// GET /api/runs/:id/suggestions – the model's suggestions for the components the caller has already voted on (only when the study shows them)
export const GET = handler({ permission: 'votes.write', params: runParamsSchema, what: 'The run' }, async ({ user, params }) => {
  const payload = await showSuggestions({ user, runId: params.id });
  return Response.json(payload, { headers: { 'Cache-Control': 'private, no-store' } });
});
