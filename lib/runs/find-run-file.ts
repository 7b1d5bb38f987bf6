/** The storage key of one of the run's decomposition files, for the assigned rater (404 when the run has no such file). */
import 'server-only';
import { AppError } from '@/lib/errors';
import { requireAssignedRun } from './assigned-run';

export async function findRunFileKey({
  user,
  runId,
  file,
}: {
  user: { id: number };
  runId: number;
  file: 'components.nii.gz' | 'mean.nii.gz' | 'mask.nii.gz' | 'structural.nii.gz';
}) {
  const run = await requireAssignedRun({ user, runId });
  const key =
    file === 'components.nii.gz'
      ? run.componentsKey
      : file === 'mean.nii.gz'
        ? run.meanKey
        : file === 'mask.nii.gz'
          ? run.maskKey
          : run.structuralKey;
  if (!key)
    throw new AppError(
      'not_found',
      file === 'structural.nii.gz'
        ? `Run ${runId} has no structural image; a study lead can attach one.`
        : `Run ${runId} has no ${file} yet; its decomposition did not write it.`,
    );
  return { key: key as string, decompositionId: run.decompositionId as number };
}
