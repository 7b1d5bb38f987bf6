/** PUT /api/runs/:id/desk — remembers where the rater is on the run (reopens there next time). */
import 'server-only';
import { updateDeskPosition } from '@/lib/db/queries/desk';
import { AppError } from '@/lib/errors';
import { requireAssignedRun } from './assigned-run';

export async function saveDeskPosition({ user, runId, componentIdx }: { user: { id: number }; runId: number; componentIdx: number }) {
  const run = await requireAssignedRun({ user, runId });
  if (componentIdx > run.k) {
    throw new AppError('validation', `Run ${runId} has ${run.k} components; component ${componentIdx} does not exist.`, {
      componentIdx: [`must be between 1 and ${run.k}`],
    });
  }
  await updateDeskPosition({ assignmentId: run.assignmentId, componentIdx });
  return { componentIdx };
}
