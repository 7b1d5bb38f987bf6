/** The caller's own calibration score, gate verdict and certification in a study they are a member of (404 otherwise). */
import 'server-only';
import { findCertification } from '@/lib/db/queries/calibration';
import { calibrationGate, scoreRater } from '@/lib/db/queries/calibration-gate';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { notFound } from '@/lib/errors';
import type { Caller } from './lead-only';

export async function myCalibration({ user, studyId }: { user: Caller; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  const { score, byKind, submittedRuns } = await scoreRater({ studyId, userId: user.id });
  const certification = await findCertification({ studyId, userId: user.id });
  const gate = await calibrationGate({ studyId, raterId: user.id });
  return { submittedRuns, score, byKind, gate, certification };
}
