import 'server-only';
import { recomputeRunDecisions } from '@/lib/consensus/recompute';
import { countRaterVotes, deleteAssignment, findAssignmentOfRater } from '@/lib/db/queries/assignments';
import { recordAudit } from '@/lib/db/queries/audit';
import { inTransaction, type Trx } from '@/lib/db/transaction';
import { AppError, notFound } from '@/lib/errors';
import { lockLedRun, type Caller } from './lead-rules';

/** What removing a rater with votes does, shown with the confirmation and in the refusal. */
function removalConsequence(name: string, votes: number): string {
  return `${name} has ${votes} vote${votes === 1 ? '' : 's'} on this run. Removing them keeps the votes in the database and in the audit log, but they no longer count for agreement or in the run's expected number of votes; the run's decisions are recomputed.`;
}

/** Deletes a rater's assignment on a locked run; with votes only when the lead confirmed (409 otherwise). */
export async function removeInTrx(
  trx: Trx,
  { run, raterId, confirm }: { run: { id: number; name: string }; raterId: number; confirm: boolean },
) {
  const a = await findAssignmentOfRater(trx, { runId: run.id, raterId });
  if (!a) throw notFound('That assignment');
  const votes = await countRaterVotes(trx, { runId: run.id, raterId });
  if (votes > 0 && !confirm) {
    throw new AppError('conflict', `${removalConsequence(a.name, votes)} Confirm to remove them.`, {
      confirm: ['required: the rater has votes on this run'],
    });
  }
  await deleteAssignment(trx, { assignmentId: a.id });
  return { name: String(a.name), votes, submittedAt: a.submittedAt ?? null, dueAt: a.dueAt ?? null };
}

/**
 * Removes a rater from a run. When they have votes the lead must confirm (409 otherwise); the
 * votes stay in the database but the rater no longer counts. Decisions are recomputed; audited.
 */
export async function removeRaterFromRun({
  user,
  runId,
  raterId,
  confirm,
  ip,
}: {
  user: Caller;
  runId: number;
  raterId: number;
  confirm: boolean;
  ip?: string | null;
}) {
  return inTransaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    const removed = await removeInTrx(trx, { run, raterId, confirm });
    await recomputeRunDecisions(trx, { runId });
    await recordAudit(
      {
        actorId: user.id,
        action: 'assignment.remove',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { raterId, raterName: removed.name, votesKept: removed.votes, submittedAt: removed.submittedAt },
        ip,
      },
      trx,
    );
    return { runId, raterId, votesKept: removed.votes };
  });
}
