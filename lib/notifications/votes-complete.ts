/**
 * The lead's "votes complete" e-mail: for every ready run whose assigned raters have all submitted
 * (at least one assignment, none open) in the last RECENT_DAYS, each active lead of its study gets
 * one message with the number of decisions waiting for them. A row in `notifications`
 * (kind run.votes_complete, payload { runId, key }) records each message, so a run is announced
 * once per completion: key is the run id and its latest submission, so a rater added later who
 * submits makes a new completion. A named lock keeps two overlapping checks from both sending.
 */
import { insertNotification, listActiveLeads, recentNotificationKeys } from '@/lib/db/queries/notifications';
import { findCompleteRuns, getNamedLock, releaseNamedLock } from '@/lib/db/queries/votes-complete';
import { inTransaction, type Db } from '@/lib/db/transaction';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { votesCompleteMail } from '@/lib/mail/templates/votes-complete';

export const VOTES_COMPLETE_KIND = 'run.votes_complete';
const RECENT_DAYS = 7;
const LOCK = 'quorum.notify-votes-complete';

export type VotesCompleteResult = { sent: Array<{ leadId: number; runId: number }>; failed: number };

export async function sendVotesCompleteNotices(db: Db): Promise<VotesCompleteResult> {
  const result: VotesCompleteResult = { sent: [], failed: 0 };
  const facility = facilityName();
  const base = publicBaseUrl();
  await inTransaction(async (trx) => {
    await getNamedLock(trx, LOCK);
    try {
      const runs = await findCompleteRuns(trx, { recentDays: RECENT_DAYS });
      if (!runs.length) return;
      const leads = await listActiveLeads(trx, { studyIds: [...new Set(runs.map((r) => r.studyId))] });
      const seen = await recentNotificationKeys(trx, { kind: VOTES_COMPLETE_KIND, userIds: leads.map((l) => l.id), days: RECENT_DAYS + 1 });
      for (const run of runs) {
        for (const lead of leads.filter((l) => Number(l.studyId) === run.studyId)) {
          if (seen.has(`${lead.id}|${run.key}`)) continue;
          const content = votesCompleteMail({
            facility,
            name: lead.name,
            studyName: run.studyName,
            runName: run.runName,
            raters: run.raters,
            pending: run.pending,
            url: run.pending ? `${base}/studies/${run.studyId}/reconcile` : `${base}/studies/${run.studyId}`,
          });
          if (!(await deliverMail({ to: lead.email, content, template: 'votes-complete' }))) {
            result.failed++;
            continue;
          }
          await insertNotification(trx, {
            userId: lead.id,
            kind: VOTES_COMPLETE_KIND,
            payload: { runId: run.runId, studyId: run.studyId, pending: run.pending, key: run.key },
          });
          result.sent.push({ leadId: Number(lead.id), runId: run.runId });
        }
      }
    } finally {
      await releaseNamedLock(trx, LOCK);
    }
  }, db);
  return result;
}
