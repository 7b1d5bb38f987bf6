/**
 * GET /api/runs/:id/series — every component the desk lists, its time course and power spectrum
 * in one binary payload (lib/desk/series-payload.ts), for the assigned rater.
 */
import 'server-only';
import { componentsOfDecomposition } from '@/lib/db/queries/desk';
import { arrangeForDesk } from '@/lib/desk/reproducibility';
import { encodeSeries } from '@/lib/desk/series-payload';
import { requireAssignedRun } from './assigned-run';

/**
 * The payload's version: the components of a decomposition never change, and which of them the
 * desk lists follows the study's reproducibility rule, so the two name its content.
 */
export async function deskSeriesVersion({ user, runId }: { user: { id: number }; runId: number }): Promise<string> {
  const run = await requireAssignedRun({ user, runId });
  const rule = run.reproducibilityRule;
  return `d${run.decompositionId}-series-${rule.policy}-${rule.policy === 'flag' ? '' : rule.threshold}`;
}

export async function loadDeskSeries({ user, runId }: { user: { id: number }; runId: number }): Promise<Uint8Array> {
  const run = await requireAssignedRun({ user, runId });
  const { components } = arrangeForDesk(await componentsOfDecomposition({ decompositionId: run.decompositionId }), run.reproducibilityRule);
  return encodeSeries(components);
}
