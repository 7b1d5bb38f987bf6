// Overdue work: assignments past their due date (due_at < now) and not submitted, on ready runs,
// with the rater's progress. No `server-only`: the worker's notify-overdue job reads it too.
import type { Knex } from 'knex';
import { bidsName } from '@/lib/bids';
import { db as defaultDb } from '@/lib/db/knex';

export type OverdueAssignment = {
  assignmentId: number;
  runId: number;
  studyId: number;
  studyName: string;
  runName: string;
  raterId: number;
  raterName: string;
  dueAt: Date;
  labelled: number;
  total: number;
};

/** Overdue assignments, optionally of one study, oldest due first. */
export async function listOverdue({ studyId }: { studyId?: number } = {}, db: Knex = defaultDb): Promise<OverdueAssignment[]> {
  const q = db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .join('users as u', 'u.id', 'a.rater_id')
    .where('r.status', 'ready')
    .whereNull('a.submitted_at')
    .whereNotNull('a.due_at')
    .where('a.due_at', '<', db.raw('NOW(3)'))
    .select(
      'a.id as assignmentId',
      'r.id as runId',
      's.id as studyId',
      's.name as studyName',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'u.id as raterId',
      'u.name as raterName',
      'a.due_at as dueAt',
      db.raw(
        `(SELECT COUNT(*) FROM votes v JOIN components c ON c.id = v.component_id JOIN decompositions d ON d.id = c.decomposition_id AND d.is_current = 1
          WHERE d.run_id = r.id AND v.rater_id = a.rater_id) as labelled`,
      ),
      db.raw('(SELECT d.k FROM decompositions d WHERE d.run_id = r.id AND d.is_current = 1 LIMIT 1) as total'),
    )
    .orderBy([{ column: 'a.due_at' }, { column: 'r.id' }, { column: 'u.name' }]);
  if (studyId) q.where('s.id', studyId);
  const rows = await q;
  return rows.map((r) => ({
    assignmentId: Number(r.assignmentId),
    runId: Number(r.runId),
    studyId: Number(r.studyId),
    studyName: r.studyName,
    runName: bidsName({ sub: r.sub, ses: r.ses, task: r.task, acq: r.acq, runLabel: r.runLabel }),
    raterId: Number(r.raterId),
    raterName: r.raterName,
    dueAt: new Date(r.dueAt),
    labelled: Number(r.labelled ?? 0),
    total: Number(r.total ?? 0),
  }));
}
