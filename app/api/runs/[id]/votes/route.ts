import { handler } from '@/lib/api/handler';
import { runParamsSchema } from '@/lib/desk/schemas';
import { listVotesForRater } from '@/lib/votes/list-votes-for-rater';

// GET /api/runs/:id/votes – the caller's votes; other raters' votes only after the caller submitted
export const GET = handler({ permission: 'votes.write', params: runParamsSchema, what: 'The run' }, async ({ user, params }) => {
  const payload = await listVotesForRater({ user, runId: params.id });
  return Response.json(payload, { headers: { 'Cache-Control': 'private, no-store' } });
});
