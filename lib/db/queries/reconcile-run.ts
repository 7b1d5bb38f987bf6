import 'server-only';
import { db, parseJson } from '@/lib/db/knex';

/** A run with its study's protocol and its current decomposition's row; null without one. No access check: callers scope. */
export async function findRunWithCurrentDecomposition({ runId }: { runId: number }) {
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
  return {
    ...run,
    labelSet: parseJson<string[]>(run.labelSet, []) ?? [],
    noiseKinds: parseJson<string[]>(run.noiseKinds, []) ?? [],
  };
}
