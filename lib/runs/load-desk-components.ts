/**
 * GET /api/runs/:id/components — the run and its current decomposition's components, for the
 * assigned rater, in the order the study's reproducibility rule gives them. Carries no votes,
 * tallies or decisions of anyone.
 */
import 'server-only';
import { bidsName } from '@/lib/bids';
import { componentsOfDecomposition } from '@/lib/db/queries/desk';
import { decompositionWarnings } from '@/lib/decomposition/warnings';
import { arrangeForDesk } from '@/lib/desk/reproducibility';
import { structuralOf, type ComponentsPayload } from '@/lib/desk/types';
import { readRunMotion } from '@/lib/storage/read-run-motion';
import { requireAssignedRun } from './assigned-run';

export async function loadDeskComponents({ user, runId }: { user: { id: number }; runId: number }): Promise<ComponentsPayload> {
  const run = await requireAssignedRun({ user, runId });
  const all = await componentsOfDecomposition({ decompositionId: run.decompositionId });
  // the study's rule for low reproducibility: flag (as they are), last, or hidden from raters
  const { components, hidden } = arrangeForDesk(all, run.reproducibilityRule);
  return {
    run: {
      runId: run.runId,
      decompositionId: run.decompositionId,
      name: bidsName(run),
      studyId: run.studyId,
      studyName: run.studyName,
      trSeconds: Number(run.trSeconds),
      droppedVolumes: run.droppedVolumes,
      k: all.length,
      warnings: decompositionWarnings(run.summary),
      labelSet: run.labelSet,
      noiseKinds: run.noiseKinds,
      ...(await readRunMotion(run).then((m) => ({ framewiseDisplacement: m.fd, motion: m.motion }))),
      structural: structuralOf(run.structuralKey, run.structuralName),
      lastComponentIdx: run.lastComponentIdx == null ? null : Number(run.lastComponentIdx),
      reproducibility: { ...run.reproducibilityRule, hidden },
    },
    components,
  };
}
