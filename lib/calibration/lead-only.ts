/**
 * The calibration set is the leads' to manage: the study access of a caller who leads the study (or
 * is the facility admin), 404 when they may not see it, 403 when they may not change it; and a run
 * of the study locked for a change (404 otherwise), that must be a calibration run.
 */
import 'server-only';
import { leadsStudy } from '@/lib/auth/permissions';
import type { Role } from '@/lib/vocabulary/roles';
import { lockStudyRun } from '@/lib/db/queries/calibration';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { Trx } from '@/lib/db/transaction';
import { AppError, notFound } from '@/lib/errors';

export type Caller = { id: number; role: Role };

const notLead = () => new AppError('forbidden', 'Only a lead of this study (or the facility admin) manages its calibration set.');

export async function requireCalibrationLead({ user, studyId }: { user: Caller; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw notLead();
  return access;
}

export async function lockRunOfStudy(trx: Trx, where: { studyId: number; runId: number }) {
  const run = await lockStudyRun(trx, where);
  if (!run) throw notFound('The run');
  return run;
}

export async function lockCalibrationRun(trx: Trx, where: { studyId: number; runId: number }) {
  const run = await lockRunOfStudy(trx, where);
  if (!run.isCalibration) throw new AppError('conflict', `${run.name} is not a calibration run. Mark it as one first.`);
  return run;
}
