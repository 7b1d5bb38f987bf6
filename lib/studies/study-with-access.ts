import 'server-only';
import { managesStudy, seesAllRuns } from '@/lib/auth/permissions';
import type { StudyRole } from '@/lib/vocabulary/roles';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { findStudyDetail, type StudyDetail } from '@/lib/db/queries/studies';
import type { UserRow } from '@/lib/db/queries/users';

/** What a user may do in one study: `canManage` (upload, change, run actions), `seesAllRuns` (else only assigned runs). */
export type StudyWithAccess = {
  study: StudyDetail;
  studyRole: StudyRole | null;
  canManage: boolean;
  seesAllRuns: boolean;
};

/** The study's protocol with the caller's access to it, or null when they may not see it (findStudyAccess decides). */
export async function studyWithAccess({
  user,
  studyId,
}: {
  user: Pick<UserRow, 'id' | 'role'>;
  studyId: number;
}): Promise<StudyWithAccess | null> {
  const access = await findStudyAccess({ user, studyId });
  const study = access ? await findStudyDetail({ studyId }) : null;
  if (!access || !study) return null;
  return {
    study,
    studyRole: access.studyRole,
    canManage: managesStudy({ role: user.role, studyRole: access.studyRole }),
    seesAllRuns: seesAllRuns(access),
  };
}
