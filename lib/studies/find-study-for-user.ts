/**
 * The study with the user's access to it, or null when the user may not see it: their study role,
 * whether they manage it (the permission module's managesStudy) and whether they see every run
 * (admins, the study's leads and observers; a rater sees only their own).
 */
import 'server-only';
import { managesStudy } from '@/lib/auth/permissions';
import { findStudyWithRole } from '@/lib/db/queries/studies';
import type { UserRow } from '@/lib/db/queries/users';

export async function findStudyForUser({ user, studyId }: { user: Pick<UserRow, 'id' | 'role'>; studyId: number }) {
  const found = await findStudyWithRole({ user, studyId });
  if (!found) return null;
  const { studyRole } = found;
  return {
    ...found,
    canManage: managesStudy({ role: user.role, studyRole }),
    seesAllRuns: user.role === 'admin' || studyRole === 'lead' || studyRole === 'observer',
  };
}
