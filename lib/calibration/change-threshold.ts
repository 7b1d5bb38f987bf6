/** A lead sets (or clears) the study's calibration threshold that gates live runs. Audited. */
import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import type { Role } from '@/lib/auth/roles';
import { recordAudit } from '@/lib/db/queries/audit';
import { calibrationThreshold, setCalibrationThreshold } from '@/lib/db/queries/calibration';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { forbidden, notFound } from '@/lib/errors';
import type { CalibrationThreshold } from '@/lib/agreement/threshold-gate';

export async function readThreshold({ user, studyId }: { user: { id: number; role: Role }; studyId: number }): Promise<CalibrationThreshold> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  return calibrationThreshold({ studyId });
}

export async function changeThreshold({ user, studyId, threshold }: { user: { id: number; role: Role }; studyId: number; threshold: CalibrationThreshold }): Promise<CalibrationThreshold> {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('changing the calibration threshold (only the study’s leads may)');
  await setCalibrationThreshold({ studyId, threshold });
  await recordAudit({ actorId: user.id, action: 'calibration.threshold', targetType: 'study', targetId: studyId, studyId, detail: threshold });
  return threshold;
}
