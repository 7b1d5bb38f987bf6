import 'server-only';
import { db } from '@/lib/db/knex';

export type QueueItem = {
  runId: number;
  studyId: number;
  studyName: string;
  sub: string;
  ses: string | null;
  task: string | null;
  runLabel: string | null;
  dueAt: Date | null;
  submittedAt: Date | null;
  labelled: number;
  total: number;
  /** A calibration run: once submitted, the rater's result page compares their labels with the reference. */
  isCalibration: boolean;
};

/** A rater's assigned runs with how many of the current decomposition's components they have labelled. */
export async function listQueueForRater({ raterId }: { raterId: number }): Promise<QueueItem[]> {
  const rows = await db('assignments as a')
    .join('runs as r', 'r.id', 'a.run_id')
    .join('studies as s', 's.id', 'r.study_id')
    .leftJoin('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', db.raw('1'));
    })
    .leftJoin('components as c', 'c.decomposition_id', 'd.id')
    .leftJoin('votes as v', function () {
      this.on('v.component_id', 'c.id').andOn('v.rater_id', 'a.rater_id');
    })
    .where('a.rater_id', raterId)
    .andWhere('r.status', 'ready')
    .groupBy('r.id', 's.id', 's.name', 'r.sub', 'r.ses', 'r.task', 'r.run_label', 'r.is_calibration', 'a.due_at', 'a.submitted_at')
    .select(
      'r.id as runId',
      's.id as studyId',
      's.name as studyName',
      'r.sub',
      'r.ses',
      'r.task',
      'r.run_label as runLabel',
      'a.due_at as dueAt',
      'a.submitted_at as submittedAt',
      'r.is_calibration as isCalibration',
      db.raw('COUNT(DISTINCT v.id) as labelled'),
      db.raw('COUNT(DISTINCT c.id) as total'),
    )
    .orderBy([{ column: 'a.submitted_at', order: 'asc' }, { column: 'a.due_at', order: 'asc' }, { column: 'r.id' }]);
  return rows.map((r) => ({ ...r, labelled: Number(r.labelled), total: Number(r.total), isCalibration: Boolean(r.isCalibration) }));
}
