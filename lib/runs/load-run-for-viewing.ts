import 'server-only';
import { loadRunShapes } from '@/lib/consensus/load-run-shapes';
import { findReadyRunStudyId } from '@/lib/db/queries/run-view';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { UserRow } from '@/lib/db/queries/users';

type Viewer = Pick<UserRow, 'id' | 'role'>;

/** Who opens a run read-only: the study's leads and observers, and facility admins. */
export type RunViewRole = 'lead' | 'observer';

/**
 * A run's current decomposition for the read-only run view: the same shapes the rating desk draws,
 * reached through the study (lead, observer or admin) instead of an assignment. Null when the
 * caller may not see the run or it has no decomposition (callers answer 404 either way).
 */
export async function loadRunForViewing({ user, runId }: { user: Viewer; runId: number }) {
  const studyId = await findReadyRunStudyId({ runId });
  const access = studyId ? await findStudyAccess({ user, studyId }) : null;
  const role: RunViewRole | null = !access
    ? null
    : access.isAdmin || access.studyRole === 'lead'
      ? 'lead'
      : access.studyRole === 'observer'
        ? 'observer'
        : null;
  if (!role) return null;
  const shapes = await loadRunShapes({ runId });
  return shapes ? { ...shapes, role } : null;
}
