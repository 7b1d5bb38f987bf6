import 'server-only';
import { db, parseJson } from '@/lib/db/knex';
import type { Knex } from 'knex';
import type { DenoisePayload, DenoiseResult } from '@/lib/denoise/schema';

export type DenoiseJob = {
  jobId: number;
  runId: number;
  status: string;
  stage: string | null;
  percent: number | null;
  message: string | null;
  payload: DenoisePayload | null;
  result: DenoiseResult | null;
  createdAt: Date;
};

/** Locks the run row (serialises denoise requests for one run) and returns the payloads of its queued or running denoise jobs. */
export async function lockActiveDenoiseJobs(
  trx: Knex.Transaction,
  { runId }: { runId: number },
): Promise<{ jobId: number; payload: unknown }[]> {
  await trx('runs').where({ id: runId }).forUpdate().first('id');
  const active = await trx('jobs')
    .where({ run_id: runId, kind: 'denoise' })
    .whereIn('status', ['queued', 'running'])
    .select('id', 'payload');
  return active.map((j: { id: number; payload: unknown }) => ({ jobId: Number(j.id), payload: parseJson(j.payload) }));
}

const COLUMNS = ['id', 'run_id', 'status', 'stage', 'percent', 'message', 'payload', 'result', 'created_at'];
function toDenoiseJob(r: Record<string, unknown>): DenoiseJob {
  return {
    jobId: Number(r.id),
    runId: Number(r.run_id),
    status: String(r.status),
    stage: (r.stage as string) ?? null,
    percent: r.percent == null ? null : Number(r.percent),
    message: (r.message as string) ?? null,
    payload: parseJson<DenoisePayload>(r.payload, null),
    result: parseJson<DenoiseResult>(r.result, null),
    createdAt: r.created_at as Date,
  };
}

/** Denoise jobs of some runs, newest first. */
export async function listDenoiseJobs({ runIds }: { runIds: number[] }): Promise<DenoiseJob[]> {
  if (!runIds.length) return [];
  const rows = await db('jobs').where({ kind: 'denoise' }).whereIn('run_id', runIds).orderBy('id', 'desc').limit(500).select(COLUMNS);
  return rows.map(toDenoiseJob);
}

/** One denoise job of a run, or null. */
export async function findDenoiseJob({ runId, jobId }: { runId: number; jobId: number }): Promise<DenoiseJob | null> {
  const row = await db('jobs').where({ id: jobId, run_id: runId, kind: 'denoise' }).first(COLUMNS);
  return row ? toDenoiseJob(row) : null;
}

/** Whether the run has a motion table (needed for motion regressors). */
export async function runHasMotion({ runId }: { runId: number }): Promise<boolean> {
  const r = await db('runs').where({ id: runId }).first('motion_key');
  return !!r?.motion_key;
}

/**
 * The finished denoise jobs that took their noise list from this release (newest first): their
 * files belong to the release's listing and are served by its files route.
 */
export async function listReleaseDenoised({ releaseId }: { releaseId: number }): Promise<DenoiseJob[]> {
  const rows = await db('jobs')
    .where({ kind: 'denoise', status: 'succeeded' })
    .whereRaw("JSON_VALUE(payload, '$.releaseId') = ?", [releaseId])
    .orderBy('id', 'desc')
    .limit(500)
    .select(COLUMNS);
  return rows.map(toDenoiseJob).filter((j) => j.result !== null);
}
