import 'server-only';
import type { Knex } from 'knex';
import { enqueueJob, type DecompositionOptionsInput } from '@/lib/jobs';
import type { DecomposeSettings } from './schema';

/** The job payload's overrides for settings chosen in the runs table (fixed N, variance fraction or another method). */
export function decompositionOptionsFor(settings?: DecomposeSettings): DecompositionOptionsInput | undefined {
  if (!settings?.dimMethod) return undefined;
  if (settings.dimMethod === 'fixed') return { components: settings.fixedComponents ?? undefined };
  if (settings.dimMethod === 'variance') return { varianceFraction: settings.varianceFraction ?? undefined };
  return { dimMethod: settings.dimMethod, components: 'auto' };
}

/**
 * Queues a decompose job for a run (lib/jobs' enqueueJob) and marks the run queued, inside the
 * caller's transaction. `options` override the study's protocol for a re-decomposition.
 */
export async function queueDecomposition(
  trx: Knex.Transaction,
  { runId, studyId, createdBy, options }: { runId: number; studyId: number; createdBy: number; options?: DecompositionOptionsInput },
): Promise<number> {
  const jobId = await enqueueJob(trx, {
    kind: 'decompose',
    payload: { runId, ...(options ? { decompositionOptions: options } : {}) },
    runId,
    studyId,
    createdBy,
  });
  await trx('jobs').where({ id: jobId }).update({ stage: 'queued', percent: 0, message: 'Waiting for a worker' });
  await trx('runs').where({ id: runId }).update({ status: 'queued', status_message: null });
  return jobId;
}
