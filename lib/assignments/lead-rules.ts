import 'server-only';
import { leadsStudy, VOTING_ROLES } from '@/lib/auth/permissions';
import { findStudyRaterMember, isCalibrationRun, lockRunWithStudyRole } from '@/lib/db/queries/assignments';
import { calibrationGate } from '@/lib/db/queries/calibration-gate';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { UserRow } from '@/lib/db/queries/users';
import type { Trx } from '@/lib/db/transaction';
import { AppError, notFound } from '@/lib/errors';

export type Caller = Pick<UserRow, 'id' | 'role'>;

/** Explains a refusal to a lead: 403 for a member who does not lead the study, 404 for anyone else. */
const notLead = () => new AppError('forbidden', 'Only a lead of this study (or the facility admin) changes its assignments.');

/** The study when the caller leads it (or is an admin); 404 when they may not see it, 403 when they may not change it. */
export async function requireLedStudy({ user, studyId }: { user: Caller; studyId: number }) {
  const access = await findStudyAccess({ user, studyId });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw notLead();
  return access;
}

/**
 * A run of a study the caller leads (the lead membership is part of the WHERE clause), locked
 * FOR UPDATE inside `trx` so concurrent changes to one run's assignments queue up.
 */
export async function lockLedRun(trx: Trx, { user, runId }: { user: Caller; runId: number }) {
  const row = await lockRunWithStudyRole(trx, { userId: user.id, runId });
  if (!row || (user.role !== 'admin' && !row.studyRole)) throw notFound('The run');
  if (user.role !== 'admin' && row.studyRole !== 'lead') throw notLead();
  return { id: row.id, studyId: row.studyId, status: row.status, name: row.name };
}

/** An active rater member of the study (study role rater), or a 422 naming the problem. */
export async function requireStudyRater(trx: Trx, { studyId, raterId, field }: { studyId: number; raterId: number; field: string }) {
  const row = await findStudyRaterMember(trx, { studyId, raterId });
  if (!row)
    throw new AppError('validation', 'That person is not a rater of this study. Add them as a rater under Protocol and members first.', {
      [field]: ['not a rater of this study'],
    });
  if (!row.active) throw new AppError('validation', `${row.name}'s account is deactivated.`, { [field]: ['deactivated account'] });
  if (!VOTING_ROLES.includes(row.role))
    throw new AppError(
      'validation',
      `${row.name}'s account (${row.role}) may not vote, so it cannot rate runs. Ask the facility admin to change the account's role.`,
      { [field]: ['account may not vote'] },
    );
  return { id: Number(row.id), name: String(row.name) };
}

/** Refuses a live run to a rater under the study's calibration threshold, saying why. */
export async function requireCalibrated(
  trx: Trx,
  { studyId, runId, rater, raterId }: { studyId: number; runId: number; rater: { name: string }; raterId: number },
) {
  if (await isCalibrationRun(trx, { runId })) return;
  const gate = await calibrationGate({ studyId, raterId }, trx);
  if (!gate.passes)
    throw new AppError(
      'conflict',
      `${rater.name} cannot take live runs yet: ${gate.reason} (the study's calibration threshold). Assign them a calibration run, or change the threshold on the calibration page.`,
    );
}
