/**
 * Cluster jobs whose Quorum job was cancelled while no worker held it (a worker died, the job went
 * back to the queue, then someone cancelled it) are still on the cluster: the worker's periodic
 * sweep cancels them with scancel and records it. Returns the cluster job ids cancelled.
 */
import type { Knex } from 'knex';
import { isTerminal } from './cluster-failure';
import { jobState, scancel } from './slurm-commands';

export async function cancelOrphanedClusterJobs(db: Knex): Promise<string[]> {
  const rows: { id: number; cluster_job_id: string; cluster_state: string | null }[] = await db('jobs')
    .where({ status: 'cancelled' })
    .whereNotNull('cluster_job_id')
    .where((q) =>
      q
        .whereNull('cluster_state')
        .orWhereNotIn('cluster_state', ['COMPLETED', 'FAILED', 'TIMEOUT', 'OUT_OF_MEMORY', 'NODE_FAIL', 'CANCELLED', 'UNKNOWN']),
    )
    .select('id', 'cluster_job_id', 'cluster_state')
    .limit(100);
  const cancelled: string[] = [];
  for (const r of rows) {
    const st = await jobState(r.cluster_job_id).catch(() => null);
    if (st && !isTerminal(st.state)) {
      await scancel(r.cluster_job_id);
      cancelled.push(r.cluster_job_id);
    }
    await db('jobs')
      .where({ id: r.id })
      .update({
        cluster_state: st && isTerminal(st.state) ? st.state.split(' ')[0]!.slice(0, 32) : 'CANCELLED',
        cluster_checked_at: db.raw('NOW(3)'),
      });
  }
  return cancelled;
}
