import { handler } from '@/lib/api/handler';
import { loadRunForReconcile } from '@/lib/consensus/load-run-for-reconcile';
import { reconcileRunParams } from '@/lib/consensus/reconcile-params';

// GET /api/reconcile/runs/:runId/components – a run's components for the lead reconciling it
export const GET = handler({ permission: 'decisions.reconcile', params: reconcileRunParams }, async ({ user, params }) => {
  const { run, components } = await loadRunForReconcile({ user, runId: params.runId });
  return { run, components };
});
