/**
 * Cluster jobs whose Quorum job was cancelled while no worker held it (a worker died, the job went
 * back to the queue, then someone cancelled it) are still on the cluster: the worker's periodic
 * sweep cancels them with scancel and records it. Returns the cluster job ids cancelled.
 */
import { listCancelledLiveClusterJobs, setClusterState } from '@/lib/db/queries/cluster-jobs';
import type { Db } from '@/lib/db/transaction';
import { isTerminal } from './cluster-failure';
import { jobState, scancel } from './slurm-commands';

export async function cancelOrphanedClusterJobs(db: Db): Promise<string[]> {
  const rows = await listCancelledLiveClusterJobs(db);
  const cancelled: string[] = [];
  for (const r of rows) {
    const st = await jobState(r.cluster_job_id).catch(() => null);
    if (st && !isTerminal(st.state)) {
      await scancel(r.cluster_job_id);
      cancelled.push(r.cluster_job_id);
    }
    await setClusterState(db, { jobId: r.id, state: st && isTerminal(st.state) ? st.state.split(' ')[0]!.slice(0, 32) : 'CANCELLED' });
  }
  return cancelled;
}
