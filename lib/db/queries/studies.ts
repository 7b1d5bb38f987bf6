import 'server-only';
import { db } from '@/lib/db/knex';
import type { UserRow } from './users';

export type StudySummary = {
  id: number;
  name: string;
  description: string | null;
  studyRole: string | null;
  runs: number;
  readyRuns: number;
};

/**
 * Studies the user may see: every study for an admin, otherwise the studies they are a member of.
 * Scoping is in the WHERE clause, not in the page.
 */
export async function listStudiesForUser({ user }: { user: Pick<UserRow, 'id' | 'role'> }): Promise<StudySummary[]> {
  const query = db('studies as s')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', 's.id').andOn('m.user_id', db.raw('?', [user.id]));
    })
    .leftJoin('runs as r', 'r.study_id', 's.id')
    .select(
      's.id',
      's.name',
      's.description',
      'm.study_role as studyRole',
      db.raw('COUNT(r.id) as runs'),
      db.raw("SUM(CASE WHEN r.status = 'ready' THEN 1 ELSE 0 END) as readyRuns"),
    )
    .where('s.archived', false)
    .groupBy('s.id', 's.name', 's.description', 'm.study_role')
    .orderBy('s.name');
  if (user.role !== 'admin') query.whereNotNull('m.user_id');
  const rows = await query;
  return rows.map((r) => ({ ...r, runs: Number(r.runs), readyRuns: Number(r.readyRuns ?? 0) }));
}
