/**
 * A lead's verdict on a rater (lib/db/queries/calibration.ts certifyRater stores and audits it).
 * A rater certified in a study with a re-calibration interval makes sure the daily `recalibrate`
 * check is queued, so a check that was cancelled or failed comes back with the next certification.
 */
import 'server-only';
import type { Role } from '@/lib/auth/roles';
import { certifyRater as storeCertification } from '@/lib/db/queries/calibration';
import { calibrationSettings } from '@/lib/db/queries/calibration-gate';
import { inTransaction } from '@/lib/db/transaction';
import { ensureRecalibrationJob } from './recalibration-job';

export async function certifyRater(input: {
  user: { id: number; role: Role };
  studyId: number;
  userId: number;
  passed: boolean;
  ip?: string | null;
}) {
  const result = await storeCertification(input);
  if (result.passed && (await calibrationSettings({ studyId: input.studyId })).recalibrationWeeks != null)
    await inTransaction((trx) => ensureRecalibrationJob(trx));
  return result;
}
