import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import { AppError, notFound } from '@/lib/errors';
import { recordAudit } from '@/lib/db/queries/audit';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { isRunReleased } from '@/lib/db/queries/desk';
import { findRunStudy, lockAssignment, markAssignmentReopened } from '@/lib/db/queries/assignments';
import { inTransaction } from '@/lib/db/transaction';
import type { UserRow } from '@/lib/db/queries/users';
import { queueMail } from '@/lib/jobs/queue-mail';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { runReopenedMail } from '@/lib/mail/templates/run-reopened';
import { notificationsEnabled } from '@/lib/notifications/config';

/**
 * A lead reopens a rater's submitted run so that the rater may change their votes again (issue 13
 * item 2: submitted votes are otherwise frozen). Only a lead of the run's study (or an admin);
 * never after release. The votes as first submitted stay in submitted_votes, which agreement
 * reads; every later change is audited as a vote change after reopening. The reopen itself is
 * audited with the lead's reason. The rater sees the run among their open work again and submits
 * it once more when done; they are told by e-mail (queued in the same transaction, sent by the
 * worker's send-mail job) unless notifications are off.
 */
export async function reopenAssignment({
  user,
  runId,
  raterId,
  reason,
  ip = null,
}: {
  user: Pick<UserRow, 'id' | 'role' | 'name'>;
  runId: number;
  raterId: number;
  reason: string;
  ip?: string | null;
}) {
  const run = await findRunStudy({ runId });
  const access = run ? await findStudyAccess({ user, studyId: run.studyId }) : null;
  if (!run || !access) throw notFound('The run');
  if (!leadsStudy(access))
    throw new AppError('forbidden', "Only a lead of this study (or the facility admin) reopens a rater's submitted run.");
  return inTransaction(async (trx) => {
    const a = await lockAssignment(trx, { runId, raterId });
    if (!a) throw notFound('That assignment');
    if (await isRunReleased({ runId }, trx)) {
      throw new AppError('conflict', `Run ${run.name} has been released; its votes are frozen for good. Nothing was reopened.`);
    }
    if (!a.submittedAt) {
      throw new AppError(
        'conflict',
        `${a.raterName} has not submitted ${run.name}${a.reopenCount ? ' since it was last reopened' : ''}, so there is nothing to reopen: they can still change their votes.`,
      );
    }
    const at = new Date();
    await markAssignmentReopened(trx, { assignmentId: a.id, by: user.id, at });
    await recordAudit(
      {
        actorId: user.id,
        action: 'assignment.reopen',
        targetType: 'run',
        targetId: runId,
        studyId: run.studyId,
        detail: {
          raterId,
          raterName: a.raterName,
          reason,
          submittedAt: a.submittedAt,
          firstSubmittedAt: a.firstSubmittedAt,
          reopenCount: a.reopenCount + 1,
        },
        ip,
      },
      trx,
    );
    if (a.raterActive && notificationsEnabled()) {
      const content = runReopenedMail({
        facility: facilityName(),
        name: a.raterName,
        leadName: user.name,
        studyName: access.name,
        runName: run.name,
        reason,
        url: `${publicBaseUrl()}/runs/${runId}/rate`,
      });
      await queueMail(trx, { to: a.raterEmail, template: 'run-reopened', content, secrets: [] });
    }
    return { runId, raterId, raterName: a.raterName, reopenedAt: at.toISOString(), reopenCount: a.reopenCount + 1 };
  });
}
