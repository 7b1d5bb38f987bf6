import 'server-only';
import { lockActiveDenoiseJobs } from '@/lib/db/queries/exports';
import { inTransaction } from '@/lib/db/transaction';
import { enqueueJob } from './queue';
import { denoisePayloadSchema, type DenoisePayload } from '@/lib/denoise/schema';

/**
 * Queues a denoise job for a run (an identical queued or running request returns that job).
 * The payload is validated with the same schema the worker's kind uses, and the worker validates
 * it again when it claims.
 */
export async function enqueueDenoise({
  payload,
  studyId,
  createdBy,
}: {
  payload: DenoisePayload;
  studyId: number;
  createdBy: number;
}): Promise<{ jobId: number; existing: boolean }> {
  const data = denoisePayloadSchema.parse(payload);
  return inTransaction(async (trx) => {
    const active = await lockActiveDenoiseJobs(trx, { runId: data.runId });
    const same = active.find((j) => JSON.stringify(j.payload) === JSON.stringify(data));
    if (same) return { jobId: same.jobId, existing: true };
    const id = await enqueueJob(trx, { kind: 'denoise', payload: data, runId: data.runId, studyId, createdBy });
    return { jobId: Number(id), existing: false };
  });
}
