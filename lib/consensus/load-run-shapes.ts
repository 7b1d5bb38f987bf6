/**
 * A run's current decomposition in the desk's shapes (the run, its motion, its components), with its
 * files' storage keys; null without one. No access check: callers scope (Reconcile, calibration result).
 */
import 'server-only';
import { bidsName } from '@/lib/bids';
import { componentsOfDecomposition, droppedVolumesOf } from '@/lib/db/queries/desk';
import { findRunWithCurrentDecomposition } from '@/lib/db/queries/reconcile-run';
import { decompositionWarnings } from '@/lib/decomposition/warnings';
import { structuralOf, type DeskRun } from '@/lib/desk/types';
import { readRunMotion } from '@/lib/storage/read-run-motion';

export async function loadRunShapes({ runId }: { runId: number }) {
  const run = await findRunWithCurrentDecomposition({ runId });
  if (!run) return null;
  const { fd, motion } = await readRunMotion({ ...run, droppedVolumes: droppedVolumesOf(run) });
  const components = await componentsOfDecomposition({ decompositionId: run.decompositionId });
  const deskRun: DeskRun = {
    runId: run.runId,
    decompositionId: run.decompositionId,
    name: bidsName(run),
    studyId: run.studyId,
    studyName: run.studyName,
    trSeconds: Number(run.trSeconds),
    droppedVolumes: droppedVolumesOf(run),
    k: components.length,
    warnings: decompositionWarnings(run.summary),
    labelSet: run.labelSet,
    noiseKinds: run.noiseKinds,
    framewiseDisplacement: fd,
    motion,
    structural: structuralOf(run.structuralKey, run.structuralName),
    lastComponentIdx: null,
    // the lead sees every component; the rule is carried so the feature panel can flag low ones
    reproducibility: {
      threshold: run.reproducibilityThreshold == null ? 0.8 : Number(run.reproducibilityThreshold),
      policy: run.lowReproducibility ?? 'flag',
      hidden: 0,
    },
  };
  const files = {
    'components.nii.gz': run.componentsKey,
    'mean.nii.gz': run.meanKey,
    'mask.nii.gz': run.maskKey,
    'structural.nii.gz': run.structuralKey,
  } as Record<string, string | null>;
  return { run: deskRun, components, files };
}
