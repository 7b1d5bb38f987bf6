/** A lead sets (or clears) the study's calibration threshold that gates live runs, the calibration set's name and the re-calibration interval. Audited. */
import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import type { Role } from '@/lib/vocabulary/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { calibrationSettings, setCalibrationThreshold, type CalibrationSettings } from '@/lib/db/queries/calibration-gate';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { forbidden, notFound } from '@/lib/errors';
import { inTransaction } from '@/lib/db/transaction';
import { ensureRecalibrationJob } from '@/lib/calibration/recalibration-job';

type SettingsChange = { minAc1: number | null; minSensitivity: number | null; setName?: string | null; recalibrationWeeks?: number | null };

export async function readThreshold({
  user,
  studyId,
}: {
  user: { id: number; role: Role };
  studyId: number;
}): Promise<CalibrationSettings> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  return calibrationSettings({ studyId });
}

export async function changeThreshold({
  user,
  studyId,
  threshold,
}: {
  user: { id: number; role: Role };
  studyId: number;
  threshold: SettingsChange;
}): Promise<CalibrationSettings> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('changing the calibration threshold (only the study’s leads may)');
  await setCalibrationThreshold({ studyId, threshold });
  const settings = await calibrationSettings({ studyId });
  await recordAudit({
    actorId: user.id,
    action: 'calibration.threshold',
    targetType: 'study',
    targetId: studyId,
    studyId,
    detail: settings,
  });
  // the daily re-calibration check runs while any study has an interval
  if (settings.recalibrationWeeks != null) await inTransaction((trx) => ensureRecalibrationJob(trx));
  return settings;
}
