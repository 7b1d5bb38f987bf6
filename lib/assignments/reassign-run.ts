import 'server-only';
import { recomputeRunDecisions } from '@/lib/consensus/recompute';
import { findAssignmentOfRater, insertAssignment, isAssigned } from '@/lib/db/queries/assignments';
import { recordAudit } from '@/lib/db/queries/audit';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { afterAssignmentsCreated } from '@/lib/jobs/queue-notifications';
import { lockLedRun, requireCalibrated, requireStudyRater, type Caller } from './lead-rules';
import { removeInTrx } from './remove-rater';

/**
 * Hands a rater's place on a run to another rater of the study (same due date unless a new one
 * is given), in one transaction: confirmation rules as for removal, decisions recomputed, one
 * audit entry, the new rater e-mailed in the next batch.
 */
export async function reassignRun({
  user,
  runId,
  fromRaterId,
  toRaterId,
  dueAt,
  confirm,
  ip,
}: {
  user: Caller;
  runId: number;
  fromRaterId: number;
  toRaterId: number;
  dueAt?: Date | null;
  confirm: boolean;
  ip?: string | null;
}) {
  return inTransaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    if (run.status !== 'ready') throw new AppError('conflict', `Run ${run.name} is ${run.status}; raters are assigned once it is ready.`);
    if (fromRaterId === toRaterId)
      throw new AppError('validation', 'Choose a different rater to take over.', { replaceWith: ['same rater'] });
    const to = await requireStudyRater(trx, { studyId: run.studyId, raterId: toRaterId, field: 'replaceWith' });
    if (await isAssigned(trx, { runId, raterId: toRaterId })) {
      throw new AppError('conflict', `${to.name} is already assigned to ${run.name}.`);
    }
    await requireCalibrated(trx, { studyId: run.studyId, runId, rater: to, raterId: toRaterId });
    const old = await findAssignmentOfRater(trx, { runId, raterId: fromRaterId });
    const removed = await removeInTrx(trx, { run, raterId: fromRaterId, confirm });
    const due = dueAt === undefined ? (old?.dueAt ?? null) : dueAt;
    await insertAssignment(trx, { runId, raterId: toRaterId, assignedBy: user.id, dueAt: due });
    await recomputeRunDecisions(trx, { runId });
    await recordAudit(
      {
        actorId: user.id,
        action: 'assignment.reassign',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { fromRaterId, fromName: removed.name, toRaterId, toName: to.name, votesKept: removed.votes, dueAt: due },
        ip,
      },
      trx,
    );
    await afterAssignmentsCreated(trx, { studyId: run.studyId });
    return { runId, fromRaterId, toRaterId, votesKept: removed.votes };
  });
}
