import 'server-only';
import { recomputeRunDecisions } from '@/lib/consensus/recompute';
import { countPendingDecisions, insertAssignment, isAssigned } from '@/lib/db/queries/assignments';
import { recordAudit } from '@/lib/db/queries/audit';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { afterAssignmentsCreated } from '@/lib/jobs/queue-notifications';
import { lockLedRun, requireCalibrated, requireStudyRater, type Caller } from './lead-rules';

/**
 * Adds a rater to a ready run (optionally with a due date). The run's decisions are recomputed at
 * once, since the number of expected votes grew (a run whose decisions were complete goes back to
 * waiting for the new rater under most rules). Audited; the rater is e-mailed in the next batch.
 */
export async function addRaterToRun({
  user,
  runId,
  raterId,
  dueAt,
  ip,
}: {
  user: Caller;
  runId: number;
  raterId: number;
  dueAt?: Date | null;
  ip?: string | null;
}) {
  return inTransaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    if (run.status !== 'ready') throw new AppError('conflict', `Run ${run.name} is ${run.status}; raters are assigned once it is ready.`);
    const rater = await requireStudyRater(trx, { studyId: run.studyId, raterId, field: 'raterId' });
    if (await isAssigned(trx, { runId, raterId })) {
      throw new AppError('conflict', `${rater.name} is already assigned to ${run.name}.`);
    }
    await requireCalibrated(trx, { studyId: run.studyId, runId, rater, raterId });
    const pendingBefore = await countPendingDecisions(trx, runId);
    await insertAssignment(trx, { runId, raterId, assignedBy: user.id, dueAt: dueAt ?? null });
    await recomputeRunDecisions(trx, { runId });
    const pendingAfter = await countPendingDecisions(trx, runId);
    await recordAudit(
      {
        actorId: user.id,
        action: 'assignment.add',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { raterId, raterName: rater.name, dueAt: dueAt ?? null, pendingBefore, pendingAfter },
        ip,
      },
      trx,
    );
    await afterAssignmentsCreated(trx, { studyId: run.studyId });
    return { runId, raterId, pendingBefore, pendingAfter };
  });
}
