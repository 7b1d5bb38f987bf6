import 'server-only';
import { lockStudyRuns, updateOpenDue, updateRunDue } from '@/lib/db/queries/assignments';
import { recordAudit } from '@/lib/db/queries/audit';
import { inTransaction } from '@/lib/db/transaction';
import { notFound } from '@/lib/errors';
import { ensureDailyOverdue } from '@/lib/jobs/queue-notifications';
import { lockLedRun, requireLedStudy, type Caller } from './lead-rules';

/** Sets (or clears) the due date of one rater's assignment, or of every open assignment of a run. Audited. */
export async function setRunDue({
  user,
  runId,
  raterId,
  dueAt,
  ip,
}: {
  user: Caller;
  runId: number;
  raterId?: number;
  dueAt: Date | null;
  ip?: string | null;
}) {
  return inTransaction(async (trx) => {
    const run = await lockLedRun(trx, { user, runId });
    const changed = await updateRunDue(trx, { runId, raterId, dueAt });
    if (raterId && !changed) throw notFound('That assignment');
    await recordAudit(
      {
        actorId: user.id,
        action: 'assignment.due',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: { raterId: raterId ?? null, dueAt, assignments: changed },
        ip,
      },
      trx,
    );
    if (dueAt) await ensureDailyOverdue(trx);
    return { runId, changed };
  });
}

/**
 * Sets (or clears) the due date of every open (unsubmitted) assignment on many runs of a study the
 * caller leads; runs of other studies are ignored by the WHERE clause (and reported as skipped).
 * One audit entry per run changed.
 */
export async function setStudyDue({
  user,
  studyId,
  runIds,
  dueAt,
  ip,
}: {
  user: Caller;
  studyId: number;
  runIds: number[];
  dueAt: Date | null;
  ip?: string | null;
}) {
  await requireLedStudy({ user, studyId });
  return inTransaction(async (trx) => {
    const own = await lockStudyRuns(trx, { studyId, runIds });
    let changed = 0;
    for (const runId of own) {
      const n = await updateOpenDue(trx, { runId, dueAt });
      changed += n;
      if (n)
        await recordAudit(
          {
            actorId: user.id,
            action: 'assignment.due',
            targetType: 'run',
            targetId: runId,
            studyId,
            detail: { dueAt, assignments: n, bulk: true },
            ip,
          },
          trx,
        );
    }
    if (dueAt && changed) await ensureDailyOverdue(trx);
    return { runs: own.length, skipped: runIds.length - own.length, changed };
  });
}
