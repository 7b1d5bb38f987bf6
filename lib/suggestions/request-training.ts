/**
 * A lead asks for a new suggestion model of a study, learnt from the released decisions of the
 * study itself or of studies of the facility the lead selects (each one the caller leads, or any
 * for an admin). Queues the `train-suggestions` job and records the request in the audit log.
 */
import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import type { Role } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { activeTrainingJob, inSuggestionTransaction } from '@/lib/db/queries/suggestions';
import { AppError, forbidden, notFound } from '@/lib/errors';
import { enqueueJob } from '@/lib/jobs/queue';

export async function requestTraining({
  user,
  studyId,
  sourceStudyIds,
}: {
  user: { id: number; role: Role };
  studyId: number;
  sourceStudyIds?: number[];
}): Promise<{ jobId: number; sourceStudyIds: number[] }> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('training suggestions for this study (only its leads may)');
  const sources = [...new Set(sourceStudyIds ?? [studyId])].sort((a, b) => a - b);
  for (const id of sources) {
    const a = id === studyId ? access : await findStudyAccess({ user, studyId: id });
    if (!a || !leadsStudy(a)) throw new AppError('validation', `Study ${id} cannot be used: you can train only from studies you lead.`);
  }
  return inSuggestionTransaction(async (trx) => {
    const active = await activeTrainingJob(trx, { studyId });
    if (active) return { jobId: active, sourceStudyIds: sources };
    const jobId = await enqueueJob(trx, {
      kind: 'train-suggestions',
      payload: { studyId, sourceStudyIds: sources },
      studyId,
      createdBy: user.id,
    });
    await recordAudit(
      {
        actorId: user.id,
        action: 'suggestions.train_requested',
        targetType: 'study',
        targetId: studyId,
        studyId,
        detail: { sourceStudyIds: sources, jobId },
      },
      trx,
    );
    return { jobId, sourceStudyIds: sources };
  });
}
