import 'server-only';
import { db } from '@/lib/db/knex';
import type { UserRow } from './users';
import type { Access } from '@/lib/vocabulary/roles';

/**
 * The caller's access to one study, or null when they may not see it: admins see every study that
 * is not archived; everyone else only such studies they are a member of. The one answer to "may this
 * user see this study" (the handler's scope, pages' studyPageAccess and use cases all ask it). Use it to scope every study-level query.
 */
export async function findStudyAccess({ user, studyId }: { user: Pick<UserRow, 'id' | 'role'>; studyId: number }): Promise<Access | null> {
  const row = await db('studies as s')
    .leftJoin('study_members as m', function () {
      this.on('m.study_id', 's.id').andOn('m.user_id', db.raw('?', [user.id]));
    })
    .where('s.id', studyId)
    .andWhere('s.archived', false)
    .first('s.id as studyId', 's.name', 'm.study_role as studyRole');
  if (!row) return null;
  const isAdmin = user.role === 'admin';
  if (!isAdmin && !row.studyRole) return null;
  return { studyId: row.studyId, name: row.name, studyRole: row.studyRole ?? null, isAdmin };
}

/** The caller's access to the study that owns a run (with the run's id), or null when the run is not theirs to see. */
export async function findRunAccess({
  user,
  runId,
}: {
  user: Pick<UserRow, 'id' | 'role'>;
  runId: number;
}): Promise<(Access & { runId: number }) | null> {
  const run = await db('runs').where({ id: runId }).first('study_id');
  if (!run) return null;
  const access = await findStudyAccess({ user, studyId: Number(run.study_id) });
  return access ? { ...access, runId } : null;
}
