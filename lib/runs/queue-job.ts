/**
 * Queuing a run's decomposition: the one function production (lib/runs/actions.ts, upload.ts) and
 * tests and scripts (load, bench) use. No `server-only` here: the bench script runs without the
 * react-server condition.
 */
import { findOpenDecomposeJob, lockRunForQueue, markRunQueued } from '@/lib/db/queries/decompose-run';
import { markJobWaiting } from '@/lib/db/queries/jobs';
import { inTransaction, type Db } from '@/lib/db/transaction';
import { enqueueJob, PermanentJobError, type DecompositionOptionsInput } from '@/lib/jobs';
import type { DecomposeSettings } from './schema';

/** The job payload's overrides for settings chosen in the runs table (fixed N, variance fraction or another method). */
export function decompositionOptionsFor(settings?: DecomposeSettings): DecompositionOptionsInput | undefined {
  if (!settings?.dimMethod) return undefined;
  if (settings.dimMethod === 'fixed') return { components: settings.fixedComponents ?? undefined };
  if (settings.dimMethod === 'variance') return { varianceFraction: settings.varianceFraction ?? undefined };
  return { dimMethod: settings.dimMethod, components: 'auto' };
}

/**
 * Queues a decompose job for a run (lib/jobs' enqueueJob) and marks the run queued, in one
 * transaction (a savepoint inside the caller's transaction when given one). The run row is locked;
 * when a decompose job for the run is already queued or running, that job's id is returned
 * (`existing: true`) instead of adding another. `options` override the study's protocol for a
 * re-decomposition.
 */
export async function queueDecomposition(
  db: Db,
  {
    runId,
    createdBy = null,
    options,
    priority,
    maxAttempts,
  }: { runId: number; createdBy?: number | null; options?: DecompositionOptionsInput; priority?: number; maxAttempts?: number },
): Promise<{ jobId: number; existing: boolean }> {
  return inTransaction(async (trx) => {
    const run = await lockRunForQueue(trx, { runId });
    if (!run) throw new PermanentJobError(`Run ${runId} does not exist.`);
    const active = await findOpenDecomposeJob(trx, { runId });
    if (active !== null) return { jobId: active, existing: true };
    const jobId = await enqueueJob(trx, {
      kind: 'decompose',
      payload: { runId, ...(options ? { decompositionOptions: options } : {}) },
      runId,
      studyId: run.studyId,
      createdBy,
      priority,
      maxAttempts,
    });
    await markJobWaiting(trx, jobId);
    await markRunQueued(trx, { runId });
    return { jobId, existing: false };
  }, db);
}
