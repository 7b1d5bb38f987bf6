/**
 * The lead's verdict on a rater: their scores now are stored in rater_certifications with passed,
 * certified_by and certified_at, and audited. Passing needs at least one submitted calibration run.
 * A rater certified in a study with a re-calibration interval makes sure the daily `recalibrate`
 * check is queued, so a check that was cancelled or failed comes back with the next certification.
 */
import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { findStudyRater, upsertCertification } from '@/lib/db/queries/calibration';
import { calibrationSettings, scoreRater } from '@/lib/db/queries/calibration-gate';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { requireCalibrationLead, type Caller } from './lead-only';
import { ensureRecalibrationJob } from './recalibration-job';

export async function certifyRater({
  user,
  studyId,
  userId,
  passed,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  userId: number;
  passed: boolean;
  ip?: string | null;
}) {
  await requireCalibrationLead({ user, studyId });
  const result = await inTransaction(async (trx) => {
    const member = await findStudyRater(trx, { studyId, userId, forUpdate: true });
    if (!member) throw new AppError('validation', 'That person is not a rater of this study.', { userId: ['not a rater of this study'] });
    const { score, submittedRuns } = await scoreRater({ studyId, userId }, trx);
    if (passed && (submittedRuns === 0 || score.n === 0)) {
      throw new AppError('conflict', `${member.name} has not submitted a calibration run yet, so there is no score to certify.`);
    }
    const now = new Date();
    await upsertCertification(trx, { studyId, userId, scores: score, passed, certifiedBy: user.id, certifiedAt: now });
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.certified',
        targetType: 'user',
        targetId: userId,
        studyId,
        ip,
        detail: {
          passed,
          rater: member.name,
          n: score.n,
          percentAgreement: score.percentAgreement.value,
          cohenKappa: score.cohenKappa.value,
          gwetAC1: score.gwetAC1.value,
        },
      },
      trx,
    );
    return { userId, passed, certifiedAt: now, score };
  });
  if (result.passed && (await calibrationSettings({ studyId })).recalibrationWeeks != null)
    await inTransaction((trx) => ensureRecalibrationJob(trx));
  return result;
}
