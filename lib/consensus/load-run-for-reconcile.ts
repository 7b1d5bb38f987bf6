import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import { loadRunShapes } from './load-run-shapes';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { UserRow } from '@/lib/db/queries/users';
import { AppError } from '@/lib/errors';

/**
 * A run's current decomposition as a study lead sees it in Reconcile: the same shapes the
 * rating desk draws (maps, time courses, spectra, features), reached through leading the study
 * instead of an assignment. 404 when the run is not in a study the caller leads.
 */
export async function loadRunForReconcile({ user, runId }: { user: Pick<UserRow, 'id' | 'role'>; runId: number }) {
  const shapes = await loadRunShapes({ runId });
  const access = shapes ? await findStudyAccess({ user, studyId: shapes.run.studyId }) : null;
  if (!shapes || !leadsStudy(access)) throw new AppError('not_found', `Run ${runId} is not in a study you lead.`);
  return shapes;
}
