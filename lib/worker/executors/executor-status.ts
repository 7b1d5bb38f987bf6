/**
 * For the Facility page: where decompositions run, the settings in force and whether the cluster
 * answers (sinfo from this server; the worker's machine answers for itself in its log).
 */
import { DEFAULT_TEMPLATE } from './batch-script';
import { executorName, slurmSettings, workerConcurrency } from './settings';
import { clusterAnswers } from './slurm-commands';

export interface ExecutorStatus {
  executor: 'local' | 'slurm' | null;
  /** A setting that is wrong, said so that the admin can fix it. */
  problem: string | null;
  settings: { label: string; value: string }[];
  cluster: { ok: true; partitions: { name: string; state: string; nodes: string }[] } | { ok: false; error: string } | null;
}

export async function executorStatus(): Promise<ExecutorStatus> {
  let executor: 'local' | 'slurm';
  try {
    executor = executorName();
  } catch (err) {
    return { executor: null, problem: (err as Error).message, settings: [], cluster: null };
  }
  if (executor === 'local') {
    let concurrency = '1';
    try {
      concurrency = String(workerConcurrency());
    } catch (err) {
      return { executor, problem: (err as Error).message, settings: [], cluster: null };
    }
    return { executor, problem: null, settings: [{ label: 'Jobs per worker at once', value: concurrency }], cluster: null };
  }
  try {
    const s = slurmSettings();
    const settings = [
      {
        label: 'Batch script template',
        value: s.template ?? `built in (${DEFAULT_TEMPLATE.split('\n').length - 1} lines; README shows it)`,
      },
      { label: 'Partition', value: s.partition ?? 'the cluster’s default' },
      { label: 'Account', value: s.account ?? 'none' },
      { label: 'Time limit per run', value: s.time },
      { label: 'CPUs per run', value: String(s.cpus) },
      { label: 'Memory per run', value: s.mem },
      { label: 'Set-up lines', value: s.setup.length ? s.setup.join(' ; ') : 'none' },
      { label: 'Storage root on the cluster', value: s.clusterStorageRoot },
      { label: 'Quorum on the cluster', value: s.clusterHome },
      { label: 'Polling interval', value: `${s.pollMs} ms` },
      {
        label: 'Runs per job array',
        value: s.arrayMax > 1 ? `up to ${s.arrayMax}, gathered for ${s.arrayWaitMs} ms` : 'no arrays (one cluster job per run)',
      },
      { label: 'Jobs per worker at once', value: String(workerConcurrency()) },
    ];
    return { executor, problem: null, settings, cluster: await clusterAnswers() };
  } catch (err) {
    return { executor, problem: (err as Error).message, settings: [], cluster: null };
  }
}
