/**
 * The rater's way into a run: their assignment on a ready run, or a 404 that reads the same for
 * "no such run" and "not yours", so a rater cannot probe other runs.
 */
import 'server-only';
import { findAssignedRun } from '@/lib/db/queries/desk';
import type { Trx } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';

export const notAssigned = (runId: number) =>
  new AppError('not_found', `Run ${runId} is not among the runs assigned to you. Open it from your queue on the home page.`);

export async function requireAssignedRun(where: { user: { id: number }; runId: number; forUpdate?: boolean }, trx?: Trx) {
  const run = await findAssignedRun(where, trx);
  if (!run) throw notAssigned(where.runId);
  return run;
}
