/** The suggestion settings, model in use (report, training releases) and last training job of a study, for its leads and observers. */
import 'server-only';
import type { Role } from '@/lib/vocabulary/roles';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { latestTrainingJob, suggestionSettings } from '@/lib/db/queries/suggestions';
import { findActiveModel } from './active-model';
import { notFound } from '@/lib/errors';

export async function studySuggestions({ user, studyId }: { user: { id: number; role: Role }; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  const [settings, model, job] = await Promise.all([
    suggestionSettings({ studyId }),
    findActiveModel({ studyId }),
    latestTrainingJob({ studyId }),
  ]);
  return {
    enabled: settings.enabled,
    model: model
      ? { id: model.id, version: model.version, createdAt: model.createdAt, report: model.report, training: model.training }
      : null,
    training: job,
  };
}
