/**
 * Periodic re-calibration (issue 16): every certified rater of a study with a re-calibration
 * interval (studies.recalibration_weeks) whose last pass over the calibration set is at least that
 * many weeks old gets the set again — the finished round's score is kept in calibration_rounds,
 * the rater's votes on the set are cleared and the assignments reopened (due in 14 days), so the
 * runs appear in the rater's queue. Idempotent: a rater with an open calibration assignment is
 * not due, and the due check is repeated under a lock, so a second run (or a second worker)
 * assigns nothing. Audited as calibration.recalibration_assigned. Run by the `recalibrate` job.
 */
import { inTransaction, type Db } from '@/lib/db/transaction';
import { recordAudit } from '@/lib/db/queries/audit';
import { dueRecalibrations, startRecalibrationRound } from '@/lib/db/queries/calibration-rounds';
import { afterAssignmentsCreated } from '@/lib/jobs/queue-notifications';

const DUE_DAYS = 14;

export async function assignDueRecalibrations(db: Db, { now = new Date() }: { now?: Date } = {}) {
  const started: Array<{ studyId: number; raterId: number; round: number; runIds: number[] }> = [];
  for (const d of await dueRecalibrations({ now }, db)) {
    const dueAt = new Date(now.getTime() + DUE_DAYS * 24 * 3600 * 1000);
    const r = await inTransaction(async (trx) => {
      const res = await startRecalibrationRound(trx, { studyId: d.studyId, raterId: d.raterId, now, dueAt });
      if (res) {
        await recordAudit(
          {
            actorId: null,
            action: 'calibration.recalibration_assigned',
            targetType: 'user',
            targetId: d.raterId,
            studyId: d.studyId,
            detail: {
              closedRound: res.round,
              ac1: res.closed.ac1,
              noiseSensitivity: res.closed.sensitivity,
              runIds: res.runIds,
              weeks: d.weeks,
            },
          },
          trx,
        );
      }
      return res;
    }, db);
    if (r) started.push({ studyId: d.studyId, raterId: d.raterId, round: r.round + 1, runIds: r.runIds });
  }
  if (started.length) await afterAssignmentsCreated(db);
  return { started };
}
