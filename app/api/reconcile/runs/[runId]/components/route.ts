import { handler } from '@/lib/api/handler';
import { loadRunForReview } from '@/lib/db/queries/run-review';
import { reviewRunParams } from '@/lib/consensus/review-schemas';

// GET /api/reconcile/runs/:runId/components – a run's components for the lead reconciling it
export const GET = handler({ permission: 'decisions.reconcile', params: reviewRunParams }, async ({ user, params }) => {
  const { run, components } = await loadRunForReview({ user, runId: params.runId });
  return { run, components };
});
