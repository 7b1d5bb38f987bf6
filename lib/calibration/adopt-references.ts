/**
 * A lead copies a calibration run's current decisions into its reference labels (replacing earlier
 * ones). Refused with a 409 while any component's decision is pending: reconcile the run first.
 */
import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { runComponents, upsertReferenceLabels } from '@/lib/db/queries/calibration';
import { inTransaction } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { lockCalibrationRun, requireCalibrationLead, type Caller } from './lead-only';

export async function adoptReferences({
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
    const run = await lockCalibrationRun(trx, { studyId, runId });
    const comps = await runComponents(trx, runId);
    if (comps.length === 0) throw new AppError('conflict', `${run.name} has no components to label.`);
    const pending = comps.filter((c) => !c.decisionLabel || c.method === 'pending');
    if (pending.length) {
      throw new AppError(
        'conflict',
        `${pending.length} of ${comps.length} components of ${run.name} have no decision yet (component${pending.length === 1 ? '' : 's'} ${pending
          .slice(0, 10)
          .map((c) => c.idx)
          .join(', ')}${pending.length > 10 ? '…' : ''}). Reconcile them first, or set their reference labels one by one.`,
      );
    }
    await upsertReferenceLabels(
      trx,
      comps.map((c) => ({
        componentId: c.id,
        label: c.decisionLabel!,
        noiseKind: c.decisionLabel === 'noise' ? c.decisionKind : null,
        setBy: user.id,
      })),
    );
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.reference_set',
        targetType: 'run',
        targetId: runId,
        studyId,
        detail: { run: run.name, adopted: comps.length },
        ip,
      },
      trx,
    );
    return { runId, referenced: comps.length };
  });
}
