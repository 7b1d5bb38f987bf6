/**
 * The batched assignment e-mail: for every rater with assignments whose notified_at is null (runs
 * ready, rater active), one message listing those runs, then notified_at is set on exactly the
 * assignments listed. Each rater is handled in one transaction that locks their unnotified
 * assignments (FOR UPDATE) while the message is sent, so two overlapping jobs never mail the same
 * assignment twice; a failed delivery rolls that rater back (the next batch or retry tries again).
 */
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { assignedRunsMail } from '@/lib/mail/templates/assigned-runs';

export type AssignmentNoticeResult = { sent: Array<{ raterId: number; runIds: number[] }>; failed: number[] };

export async function sendAssignmentNotices(db: Knex): Promise<AssignmentNoticeResult> {
  const raters = (await db('assignments as a')
    .join('users as u', 'u.id', 'a.rater_id')
    .join('runs as r', 'r.id', 'a.run_id')
    .whereNull('a.notified_at')
    .whereNull('a.submitted_at')
    .where({ 'u.active': true, 'r.status': 'ready' })
    .distinct('a.rater_id')
    .orderBy('a.rater_id')) as Array<{ rater_id: number }>;
  const facility = facilityName();
  const base = publicBaseUrl();
  const result: AssignmentNoticeResult = { sent: [], failed: [] };
  for (const { rater_id } of raters) {
    const raterId = Number(rater_id);
    const outcome = await db.transaction(async (trx) => {
      // lock only this rater's unnotified assignment rows (a subquery is not locked), then read the details
      const ids = (await trx('assignments')
        .where({ rater_id: raterId })
        .whereNull('notified_at')
        .whereNull('submitted_at')
        .whereIn('run_id', trx('runs').select('id').where({ status: 'ready' }))
        .forUpdate()
        .pluck('id')) as number[];
      if (!ids.length) return null;
      const rows = await trx('assignments as a')
        .join('runs as r', 'r.id', 'a.run_id')
        .join('studies as s', 's.id', 'r.study_id')
        .whereIn('a.id', ids)
        .orderBy([{ column: 's.name' }, { column: 'r.id' }])
        .select(
          'a.id',
          'a.run_id as runId',
          'a.due_at as dueAt',
          's.name as studyName',
          'r.sub',
          'r.ses',
          'r.task',
          'r.acq',
          'r.run_label as runLabel',
        );
      if (!rows.length) return null;
      const user = await trx('users').where({ id: raterId }).first('email', 'name');
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
      await trx('assignments')
        .whereIn(
          'id',
          rows.map((r) => r.id),
        )
        .update({ notified_at: trx.fn.now(3) });
      return rows.map((r) => Number(r.runId));
    });
    if (outcome === 'failed') result.failed.push(raterId);
    else if (outcome) result.sent.push({ raterId, runIds: outcome });
  }
  return result;
}
