/** A lead sets one component's reference label (a key of the study's label set; a noise kind only with noise). */
import 'server-only';
import { recordAudit } from '@/lib/db/queries/audit';
import { calibrationLabels, runComponents, upsertReferenceLabels } from '@/lib/db/queries/calibration';
import { inTransaction } from '@/lib/db/transaction';
import { AppError, notFound } from '@/lib/errors';
import { lockCalibrationRun, requireCalibrationLead, type Caller } from './lead-only';

export async function setReferenceLabel({
  user,
  studyId,
  runId,
  componentId,
  label,
  noiseKind,
  ip = null,
}: {
  user: Caller;
  studyId: number;
  runId: number;
  componentId: number;
  label: string;
  noiseKind: string | null;
  ip?: string | null;
}) {
  await requireCalibrationLead({ user, studyId });
  const { categories, noiseKinds } = await calibrationLabels({ studyId });
  if (!categories.includes(label))
    throw new AppError('validation', `"${label}" is not a label of this study.`, { label: [`choose one of ${categories.join(', ')}`] });
  if (noiseKind && label !== 'noise')
    throw new AppError('validation', 'A noise kind goes only with the label noise.', { noiseKind: ['only with noise'] });
  if (noiseKind && !noiseKinds.includes(noiseKind))
    throw new AppError('validation', `"${noiseKind}" is not a noise kind of this study.`, {
      noiseKind: ['not a noise kind of this study'],
    });
  return inTransaction(async (trx) => {
    const run = await lockCalibrationRun(trx, { studyId, runId });
    const comp = (await runComponents(trx, runId)).find((c) => Number(c.id) === componentId);
    if (!comp) throw notFound('The component');
    await upsertReferenceLabels(trx, [{ componentId, label, noiseKind, setBy: user.id }]);
    await recordAudit(
      {
        actorId: user.id,
        action: 'calibration.reference_set',
        targetType: 'run',
        targetId: runId,
        studyId,
        detail: { run: run.name, component: comp.idx, label, noiseKind },
        ip,
      },
      trx,
    );
    return { runId, componentId, label, noiseKind };
  });
}
