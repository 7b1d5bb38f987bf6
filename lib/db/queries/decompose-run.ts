// The run's side of a decomposition: queuing it (lib/runs/queue-job.ts) and reading it in the
// decompose job (lib/worker/kinds/decompose.ts). No `server-only`: the worker and the bench script
// read it.
import type { Knex } from 'knex';

/** The run row locked FOR UPDATE, with its study (null: no such run). */
export async function lockRunForQueue(
  trx: Knex.Transaction,
  { runId }: { runId: number },
): Promise<{ id: number; studyId: number } | null> {
  const run = await trx('runs').select('id', 'study_id').where({ id: runId }).forUpdate().first();
  return run ? { id: Number(run.id), studyId: Number(run.study_id) } : null;
}

/** The id of the run's decompose job that is queued or running (null: none). */
export async function findOpenDecomposeJob(trx: Knex.Transaction, { runId }: { runId: number }): Promise<number | null> {
  const active = await trx('jobs')
    .select('id')
    .where({ run_id: runId, kind: 'decompose' })
    .whereIn('status', ['queued', 'running'])
    .first();
  return active ? Number(active.id) : null;
}

/** The run becomes queued (its status message cleared). */
export async function markRunQueued(trx: Knex.Transaction, { runId }: { runId: number }): Promise<void> {
  await trx('runs').where({ id: runId }).update({ status: 'queued', status_message: null });
}

export interface RunToDecompose {
  id: number;
  study_id: number;
  file_key: string;
  mask_key: string | null;
  motion_key: string | null;
  motion_order: string | null;
  motion_rotation_units: 'radians' | 'degrees' | null;
  status: string;
}

/** What the decompose job reads of the run (null: no such run). */
export async function findRunToDecompose(db: Knex, { runId }: { runId: number }): Promise<RunToDecompose | null> {
  const run = await db('runs')
    .select('id', 'study_id', 'file_key', 'mask_key', 'motion_key', 'motion_order', 'motion_rotation_units', 'status')
    .where({ id: runId })
    .first();
  return (run as RunToDecompose | undefined) ?? null;
}

export interface ProtocolRow {
  drop_volumes: number;
  dim_method: 'iid-mdl' | 'iid-aic' | 'laplace' | 'aic' | 'mdl' | 'fixed' | 'variance';
  fixed_components: number | null;
  variance_fraction: number | null;
  variance_norm: boolean;
  detrend: boolean;
}

/** The study's decomposition protocol (null: no such study). */
export async function findDecompositionProtocol(db: Knex, { studyId }: { studyId: number }): Promise<ProtocolRow | null> {
  const protocol = (await db('studies')
    .select('drop_volumes', 'dim_method', 'fixed_components', 'variance_fraction', 'variance_norm', 'detrend')
    .where({ id: studyId })
    .first()) as ProtocolRow | undefined;
  return protocol ?? null;
}

/** The run becomes processing, only while the worker still holds the job running (a stopping worker may have released it). */
export async function markRunProcessingWhileOwned(
  db: Knex,
  { runId, jobId, workerId }: { runId: number; jobId: number; workerId: string },
): Promise<void> {
  await db('runs')
    .where({ id: runId })
    .whereExists(db('jobs').where({ id: jobId, status: 'running', lease_owner: workerId }).select(db.raw('1')))
    .update({ status: 'processing', status_message: null });
}
