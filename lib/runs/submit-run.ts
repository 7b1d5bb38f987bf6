import 'server-only';
import { recomputeDecision } from '@/lib/consensus/recompute';
import { recordAudit } from '@/lib/db/queries/audit';
import { listUnvotedComponents, markAssignmentSubmitted } from '@/lib/db/queries/desk';
import { inTransaction } from '@/lib/db/transaction';
import { isLowReproducibility } from '@/lib/desk/reproducibility';
import { AppError } from '@/lib/errors';
import { requireAssignedRun } from './assigned-run';
import { queueVotesCompleteCheck } from '@/lib/jobs/queue-notifications';

type Caller = { id: number };

/**
 * POST /api/runs/:id/submit — marks the rater's work on the run as done. Every component of the
 * current decomposition must carry the rater's vote. Submitting twice answers the first time.
 * From now on the rater's votes are frozen (saveVote refuses) until a lead reopens the run for
 * them; the votes as first submitted are copied to submitted_votes (a resubmission after a reopen
 * adds none over them), which agreement statistics read.
 */
export async function submitRun({ user, runId, ip }: { user: Caller; runId: number; ip?: string | null }) {
  return inTransaction(async (trx) => {
    const run = await requireAssignedRun({ user, runId, forUpdate: true }, trx);
    if (run.submittedAt) return { submittedAt: new Date(run.submittedAt).toISOString(), already: true };
    const unlabelled = await listUnvotedComponents(trx, { decompositionId: run.decompositionId, raterId: user.id });
    // components the study hides from raters (low reproducibility) need no vote: the lead decides them
    const hides = run.reproducibilityRule.policy === 'hide';
    const isHidden = (r: { features: Record<string, number | null> }) =>
      hides && isLowReproducibility(r.features, run.reproducibilityRule.threshold);
    const missing = unlabelled.filter((r) => !isHidden(r)).map((r) => r.idx);
    for (const r of unlabelled.filter(isHidden)) await recomputeDecision(trx, { componentId: r.id }); // a pending decision the lead sees in Reconcile
    if (missing.length) {
      const list = missing.length > 12 ? `${missing.slice(0, 12).join(', ')} …` : missing.join(', ');
      throw new AppError(
        'conflict',
        `${missing.length} of ${run.k} components are not labelled yet (${list}). Label every component before submitting.`,
      );
    }
    const now = new Date();
    await markAssignmentSubmitted(trx, {
      assignmentId: run.assignmentId,
      runId,
      raterId: user.id,
      decompositionId: run.decompositionId,
      at: now,
    });
    await queueVotesCompleteCheck(trx); // the lead hears promptly when the last rater submits
    await recordAudit(
      {
        actorId: user.id,
        action: 'run.submit',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { components: run.k, ...(run.firstSubmittedAt ? { resubmit: true, reopenCount: run.reopenCount } : {}) },
        ip,
      },
      trx,
    );
    return { submittedAt: now.toISOString(), already: false };
  });
}
