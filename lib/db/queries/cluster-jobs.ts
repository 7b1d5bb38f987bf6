// The cluster columns of a job row (executor, cluster_name, cluster_job_id, cluster_state, …) that
// the Slurm executor keeps (lib/worker/executors/run-on-slurm.ts, cancel-orphans.ts). No
// `server-only`: the worker writes them.
import type { Knex } from 'knex';

export interface ClusterColumns {
  cluster_name: string | null;
  cluster_job_id: string | null;
}

/** The job's cluster submission name and id as stored (null: no such job). */
export async function findClusterColumns(db: Knex, { jobId }: { jobId: number }): Promise<ClusterColumns | null> {
  const row = (await db('jobs').where({ id: jobId }).first('cluster_name', 'cluster_job_id')) as ClusterColumns | undefined;
  return row ?? null;
}

/** Updates the job row's cluster columns (and cluster_checked_at) while the worker still owns the running job. */
export async function recordClusterColumns(
  db: Knex,
  { jobId, workerId, values }: { jobId: number; workerId: string; values: Record<string, unknown> },
): Promise<void> {
  await db('jobs')
    .where({ id: jobId, lease_owner: workerId, status: 'running' })
    .update({ ...values, cluster_checked_at: db.raw('NOW(3)') });
}

/** The job's cluster state, whoever owns it (a cancelled job, cancel-orphans' sweep). */
export async function setClusterState(db: Knex, { jobId, state }: { jobId: number; state: string }): Promise<void> {
  await db('jobs')
    .where({ id: jobId })
    .update({ cluster_state: state, cluster_checked_at: db.raw('NOW(3)') });
}

/** Up to 100 cancelled jobs whose cluster job may still be live (a cluster id and no final cluster state). */
export async function listCancelledLiveClusterJobs(
  db: Knex,
): Promise<Array<{ id: number; cluster_job_id: string; cluster_state: string | null }>> {
  return db('jobs')
    .where({ status: 'cancelled' })
    .whereNotNull('cluster_job_id')
    .where((q) =>
      q
        .whereNull('cluster_state')
        .orWhereNotIn('cluster_state', ['COMPLETED', 'FAILED', 'TIMEOUT', 'OUT_OF_MEMORY', 'NODE_FAIL', 'CANCELLED', 'UNKNOWN']),
    )
    .select('id', 'cluster_job_id', 'cluster_state')
    .limit(100);
}
