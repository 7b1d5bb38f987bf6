/**
 * A lead gives a rater of the study an assignment on a calibration run whose every component has a
 * reference label, so they rate it in the normal desk; 409 when already assigned.
 */
import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { insertAssignment, isAssigned } from '@/lib/db/queries/assignments';
import { findStudyRater, runComponents } from '@/lib/db/queries/calibration';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { lockCalibrationRun, requireCalibrationLead, type Caller } from './lead-only';

export async function assignCalibrationRater({
  user,
  studyId,
  runId,
  raterId,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  raterId: number;
  ip?: string | null;
}) {
  await requireCalibrationLead({ user, studyId });
  return inTransaction(async (trx) => {
    const run = await lockCalibrationRun(trx, { studyId, runId });
    const rater = await findStudyRater(trx, { studyId, userId: raterId });
    if (!rater)
      throw new AppError('validation', 'That person is not a rater of this study. Add them as a rater under Protocol and members first.', {
        raterId: ['not a rater of this study'],
      });
    if (!rater.active) throw new AppError('validation', `${rater.name}'s account is deactivated.`, { raterId: ['deactivated account'] });
    const comps = await runComponents(trx, runId);
    const missing = comps.filter((c) => !c.referenceLabel).length;
    if (comps.length === 0 || missing > 0) {
      throw new AppError(
        'conflict',
        `${run.name} has ${missing || 'no'} component${missing === 1 ? '' : 's'} without a reference label. Set the reference labels before assigning raters.`,
      );
    }
    if (await isAssigned(trx, { runId, raterId })) throw new AppError('conflict', `${rater.name} is already assigned to ${run.name}.`);
    await insertAssignment(trx, { runId, raterId, assignedBy: user.id, dueAt: null });
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.assigned',
        targetType: 'run',
        targetId: runId,
        studyId,
        detail: { run: run.name, raterId, rater: rater.name },
        ip,
      },
      trx,
    );
    return { runId, raterId };
  });
}
