/** A lead marks a ready, unreleased run of the study as a calibration run (it leaves agreement and releases). */
import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { setCalibrationFlag } from '@/lib/db/queries/calibration';
import { isRunReleased } from '@/lib/db/queries/desk';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { lockRunOfStudy, requireCalibrationLead, type Caller } from './lead-only';

export async function markCalibrationRun({
  user,
  studyId,
  runId,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  ip?: string | null;
}) {
  await requireCalibrationLead({ user, studyId });
  return inTransaction(async (trx) => {
    const run = await lockRunOfStudy(trx, { studyId, runId });
    if (run.isCalibration) return { runId, alreadyMarked: true };
    if (run.status !== 'ready')
      throw new AppError('conflict', `${run.name} is not ready for rating yet (${run.status}); only a ready run can be a calibration run.`);
    if (await isRunReleased({ runId }, trx))
      throw new AppError('conflict', `${run.name} is already in a release, so it cannot become a calibration run.`);
    await setCalibrationFlag({ studyId, runId, isCalibration: true }, trx);
    await recordAudit(
      { actorId: user.id, action: 'calibration.run_marked', targetType: 'run', targetId: runId, studyId, detail: { run: run.name }, ip },
      trx,
    );
    return { runId, alreadyMarked: false };
  });
}
