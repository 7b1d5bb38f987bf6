import 'server-only';
import { decompositionWarnings } from '@/lib/decomposition/warnings';
import { db, parseJson } from '@/lib/db/knex';
import { componentsOfDecomposition, droppedVolumesOf, readRunMotion } from './desk';
import { bidsName } from '@/lib/bids';
import { structuralOf, type DeskRun } from '@/lib/desk/types';

/** A run's current decomposition in the desk's shapes, with its files' storage keys; null without one. No access check: callers scope. */
export async function loadRunShapes({ runId }: { runId: number }) {
  const run = await db('runs as r')
    .join('studies as s', 's.id', 'r.study_id')
    .join('decompositions as d', function () {
      this.on('d.run_id', 'r.id').andOn('d.is_current', db.raw('1'));
    })
    .where('r.id', runId)
    .first(
      'r.id as runId',
      'r.study_id as studyId',
      's.name as studyName',
      'r.sub',
      'r.ses',
      'r.task',
      'r.acq',
      'r.run_label as runLabel',
      'r.tr_seconds as trSeconds',
      'r.motion_key as motionKey',
      'r.motion_order as motionOrder',
      'r.motion_rotation_units as motionRotationUnits',
      'r.structural_key as structuralKey',
      'r.structural_name as structuralName',
      's.label_set as labelSet',
      's.noise_kinds as noiseKinds',
      's.reproducibility_threshold as reproducibilityThreshold',
      's.low_reproducibility as lowReproducibility',
      'd.id as decompositionId',
      'd.parameters',
      'd.summary',
      'd.components_key as componentsKey',
      'd.mean_key as meanKey',
      'd.mask_key as maskKey',
    );
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
    labelSet: parseJson<string[]>(run.labelSet, []) ?? [],
    noiseKinds: parseJson<string[]>(run.noiseKinds, []) ?? [],
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
