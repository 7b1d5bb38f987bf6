/**
 * The batched assignment e-mail: for every rater with assignments whose notified_at is null (runs
 * ready, rater active), one message listing those runs, then notified_at is set on exactly the
 * assignments listed. Each rater is handled in one transaction that locks their unnotified
 * assignments (FOR UPDATE) while the message is sent, so two overlapping jobs never mail the same
 * assignment twice; a failed delivery rolls that rater back (the next batch or retry tries again).
 */
import { bidsName } from '@/lib/bids';
import {
  findUserContact,
  listNoticeAssignments,
  listRatersToNotify,
  lockUnnotifiedAssignments,
  markAssignmentsNotified,
} from '@/lib/db/queries/notifications';
import { inTransaction, type Db } from '@/lib/db/transaction';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { assignedRunsMail } from '@/lib/mail/templates/assigned-runs';

export type AssignmentNoticeResult = { sent: Array<{ raterId: number; runIds: number[] }>; failed: number[] };

export async function sendAssignmentNotices(db: Db): Promise<AssignmentNoticeResult> {
  const raters = await listRatersToNotify(db);
  const facility = facilityName();
  const base = publicBaseUrl();
  const result: AssignmentNoticeResult = { sent: [], failed: [] };
  for (const raterId of raters) {
    const outcome = await inTransaction(async (trx) => {
      // lock only this rater's unnotified assignment rows, then read the details
      const ids = await lockUnnotifiedAssignments(trx, { raterId });
      if (!ids.length) return null;
      const rows = await listNoticeAssignments(trx, { assignmentIds: ids });
      if (!rows.length) return null;
      const user = (await findUserContact(trx, { userId: raterId }))!;
      const content = assignedRunsMail({
        facility,
        name: user.name,
        queueUrl: `${base}/`,
        runs: rows.map((r) => ({
          studyName: r.studyName,
          runName: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }),
          url: `${base}/runs/${r.runId}/rate`,
          dueAt: r.dueAt ?? null,
        })),
      });
      const ok = await deliverMail({ to: user.email, content, template: 'assignments' });
      if (!ok) return 'failed' as const;
      await markAssignmentsNotified(trx, { assignmentIds: rows.map((r) => r.id) });
      return rows.map((r) => Number(r.runId));
    }, db);
    if (outcome === 'failed') result.failed.push(raterId);
    else if (outcome) result.sent.push({ raterId, runIds: outcome });
  }
  return result;
}
