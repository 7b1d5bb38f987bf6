/**
 * The lead's "votes complete" e-mail: for every ready run whose assigned raters have all submitted
 * (at least one assignment, none open) in the last RECENT_DAYS, each active lead of its study gets
 * one message with the number of decisions waiting for them. A row in `notifications`
 * (kind run.votes_complete, payload { runId, key }) records each message, so a run is announced
 * once per completion: key is the run id and its latest submission, so a rater added later who
 * submits makes a new completion. A named lock keeps two overlapping checks from both sending.
 */
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { parseJson, toJson } from '@/lib/db/knex';
import { facilityName, publicBaseUrl } from '@/lib/mail/config';
import { deliverMail } from '@/lib/mail/deliver';
import { votesCompleteMail } from '@/lib/mail/templates/votes-complete';

export const VOTES_COMPLETE_KIND = 'run.votes_complete';
const RECENT_DAYS = 7;
const LOCK = 'quorum.notify-votes-complete';

export type CompleteRun = {
  runId: number;
  studyId: number;
  studyName: string;
  runName: string;
  raters: number;
  pending: number;
  key: string;
};

/** Runs whose votes are complete (every assigned rater submitted), recently, with pending decisions. */
export async function findCompleteRuns(db: Knex, { runIds }: { runIds?: number[] } = {}): Promise<CompleteRun[]> {
  const q = db('runs as r')
    .join('studies as s', 's.id', 'r.study_id')
    .join('assignments as a', 'a.run_id', 'r.id')
    .where('r.status', 'ready')
    .groupBy('r.id', 's.id', 's.name', 'r.sub', 'r.ses', 'r.task', 'r.acq', 'r.run_label')
    .havingRaw('SUM(a.submitted_at IS NULL) = 0')
    .havingRaw('MAX(a.submitted_at) >= NOW(3) - INTERVAL ? DAY', [RECENT_DAYS])
    .select(
      'r.id as runId',
      's.id as studyId',
      's.name as studyName',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      db.raw('COUNT(a.id) as raters'),
      db.raw('MAX(a.submitted_at) as lastSubmit'),
      db.raw(
        `(SELECT COUNT(*) FROM components c JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
          LEFT JOIN decisions x ON x.component_id = c.id
          WHERE d.run_id = r.id AND (x.id IS NULL OR x.method = 'pending')) as pending`,
      ),
    )
    .orderBy('r.id');
  if (runIds) q.whereIn('r.id', runIds);
  const rows = await q;
  return rows.map((r) => ({
    runId: Number(r.runId),
    studyId: Number(r.studyId),
    studyName: r.studyName,
    runName: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }),
    raters: Number(r.raters),
    pending: Number(r.pending),
    key: `${r.runId}:${new Date(r.lastSubmit).toISOString()}`,
  }));
}

export type VotesCompleteResult = { sent: Array<{ leadId: number; runId: number }>; failed: number };

export async function sendVotesCompleteNotices(db: Knex): Promise<VotesCompleteResult> {
  const result: VotesCompleteResult = { sent: [], failed: 0 };
  const facility = facilityName();
  const base = publicBaseUrl();
  await db.transaction(async (trx) => {
    await trx.raw('SELECT GET_LOCK(?, 30)', [LOCK]);
    try {
      const runs = await findCompleteRuns(trx);
      if (!runs.length) return;
      const leads = await trx('study_members as m')
        .join('users as u', 'u.id', 'm.user_id')
        .whereIn('m.study_id', [...new Set(runs.map((r) => r.studyId))])
        .where({ 'm.study_role': 'lead', 'u.active': true })
        .select('m.study_id as studyId', 'u.id', 'u.email', 'u.name');
      const done = await trx('notifications')
        .where({ kind: VOTES_COMPLETE_KIND })
        .whereIn('user_id', leads.map((l) => l.id).concat(0))
        .where('created_at', '>=', trx.raw('NOW(3) - INTERVAL ? DAY', [RECENT_DAYS + 1]))
        .select('user_id', 'payload');
      const seen = new Set(done.map((d) => `${d.user_id}|${parseJson<{ key?: string }>(d.payload, {})?.key ?? ''}`));
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
          await trx('notifications').insert({
            user_id: lead.id,
            kind: VOTES_COMPLETE_KIND,
            payload: toJson({ runId: run.runId, studyId: run.studyId, pending: run.pending, key: run.key }),
          });
          result.sent.push({ leadId: Number(lead.id), runId: run.runId });
        }
      }
    } finally {
      await trx.raw('SELECT RELEASE_LOCK(?)', [LOCK]);
    }
  });
  return result;
}

/** True while some ready run still has an assignment not submitted (the check keeps re-queuing itself). */
export async function ratingsOpen(db: Knex): Promise<boolean> {
  const row = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .where('r.status', 'ready')
    .whereNull('a.submitted_at')
    .first('a.id');
  return !!row;
}
