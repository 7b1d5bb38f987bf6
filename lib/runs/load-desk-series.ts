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
 * The payload and its version. The components of a decomposition never change, and which of them
 * the desk lists follows the study's reproducibility rule, so the two name its content; `bytes` is
 * null when the caller already holds that version (`unless`), and the components are then not read.
 */
export async function loadDeskSeries({
  user,
  runId,
  unless,
}: {
  user: { id: number };
  runId: number;
  unless?: string | null;
}): Promise<{ version: string; bytes: Uint8Array | null }> {
  const run = await requireAssignedRun({ user, runId });
  const rule = run.reproducibilityRule;
  const version = `d${run.decompositionId}-series-${rule.policy}-${rule.policy === 'flag' ? '' : rule.threshold}`;
  if (unless === version) return { version, bytes: null };
  const { components } = arrangeForDesk(await componentsOfDecomposition({ decompositionId: run.decompositionId }), rule);
  return { version, bytes: encodeSeries(components) };
}
