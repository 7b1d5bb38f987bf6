// The lead's "votes complete" e-mail (lib/notifications/votes-complete.ts): which runs are complete,
// and the check's named lock. No `server-only`: the worker reads it. The leads and the notifications
// already sent are in ./notifications.ts.
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';

export type CompleteRun = {
  runId: number;
  studyId: number;
  studyName: string;
  runName: string;
  raters: number;
  pending: number;
  key: string;
};

/**
 * Ready runs whose votes are complete (at least one assignment, every assigned rater submitted)
 * with the latest submission in the last `recentDays`, and their pending decisions. key = the run
 * id and its latest submission.
 */
export async function findCompleteRuns(db: Knex, { recentDays }: { recentDays: number }): Promise<CompleteRun[]> {
  const rows = await db('runs as r')
    .join('studies as s', 's.id', 'r.study_id')
    .join('assignments as a', 'a.run_id', 'r.id')
    .where('r.status', 'ready')
    .groupBy('r.id', 's.id', 's.name', 'r.sub', 'r.ses', 'r.task', 'r.acq', 'r.run_label')
    .havingRaw('SUM(a.submitted_at IS NULL) = 0')
    .havingRaw('MAX(a.submitted_at) >= NOW(3) - INTERVAL ? DAY', [recentDays])
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

/** Takes the named lock (GET_LOCK, waiting up to 30 s) on the transaction's connection. */
export async function getNamedLock(trx: Knex.Transaction, name: string): Promise<void> {
  await trx.raw('SELECT GET_LOCK(?, 30)', [name]);
}

export async function releaseNamedLock(trx: Knex.Transaction, name: string): Promise<void> {
  await trx.raw('SELECT RELEASE_LOCK(?)', [name]);
}

/** True while some ready run still has an assignment not submitted. */
export async function ratingsOpen(db: Knex): Promise<boolean> {
  const row = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .where('r.status', 'ready')
    .whereNull('a.submitted_at')
    .first('a.id');
  return !!row;
}
