/**
 * A lead takes a run out of the calibration set. The history stays: the reference labels, the
 * raters' votes and certifications are kept, and the audit entry records each assigned rater's
 * score (AC1, noise sensitivity, components) as it stood with the run still counted.
 * From then on the run no longer counts in calibration scores.
 */
import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import type { Role } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { calibrationRunInfo, setCalibrationFlag } from '@/lib/db/queries/calibration';
import { scoreRater } from '@/lib/db/queries/calibration-gate';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { AppError, forbidden, notFound } from '@/lib/errors';

export async function unmarkCalibrationRun({
  user,
  studyId,
  runId,
  ip = null,
}: {
  user: { id: number; role: Role };
  studyId: number;
  runId: number;
  ip?: string | null;
}) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('changing the calibration set (only the study’s leads may)');
  const run = await calibrationRunInfo({ studyId, runId });
  if (!run) throw notFound('The run');
  if (!run.isCalibration) throw new AppError('conflict', `${run.name} is not a calibration run.`);
  const scoresBefore = [];
  for (const raterId of run.raterIds) {
    const { score, submittedRuns } = await scoreRater({ studyId, userId: raterId });
    scoresBefore.push({
      raterId,
      submittedRuns,
      n: score.n,
      gwetAC1: score.gwetAC1.value,
      noiseSensitivity: score.noise.sensitivity.value,
    });
  }
  await setCalibrationFlag({ studyId, runId, isCalibration: false });
  await recordAudit({
    actorId: user.id,
    action: 'calibration.run_unmarked',
    targetType: 'run',
    targetId: runId,
    studyId,
    detail: { run: run.name, scoresBefore },
    ip,
  });
  return { runId, unmarked: true };
}
