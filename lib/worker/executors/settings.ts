/**
 * Where decompose and denoise jobs run, from the environment (README "Decomposing on a cluster"):
 *
 * | variable | default | meaning |
 * |---|---|---|
 * | QUORUM_EXECUTOR | local | `local` (the worker computes) or `slurm` (the worker submits to Slurm and waits) |
 * | QUORUM_SLURM_TEMPLATE | built in | batch script template with {{placeholders}} (batch-script.ts) |
 * | QUORUM_SLURM_PARTITION, QUORUM_SLURM_ACCOUNT | none | `#SBATCH --partition/--account` |
 * | QUORUM_SLURM_TIME | 01:00:00 | time limit per run (Slurm's [days-]hours:minutes:seconds) |
 * | QUORUM_SLURM_CPUS | 2 | CPUs per run (also the decomposition's threads) |
 * | QUORUM_SLURM_MEM | 4G | memory per run |
 * | QUORUM_SLURM_SETUP | none | lines run before the command (`module load …`), `\n` or `;` between lines |
 * | QUORUM_CLUSTER_STORAGE_ROOT | the storage root | the storage root as the cluster's nodes see it |
 * | QUORUM_CLUSTER_HOME | this checkout | the Quorum checkout as the nodes see it (npm ci done) |
 * | QUORUM_SLURM_POLL_MS | 5000 | how often the worker asks Slurm about its jobs |
 * | QUORUM_SLURM_ARRAY_MAX | 50 | most runs in one `sbatch --array` (1: one cluster job per run) |
 * | QUORUM_SLURM_ARRAY_WAIT_MS | the poll interval | how long a submission waits for others to join its array |
 * | QUORUM_WORKER_CONCURRENCY | 1 (local), 50 (slurm) | jobs one worker holds at once |
 */
import { storageRoot } from '@/lib/storage';

export type ExecutorName = 'local' | 'slurm';

export interface SlurmSettings {
  template: string | null;
  partition: string | null;
  account: string | null;
  time: string;
  cpus: number;
  mem: string;
  setup: string[];
  clusterStorageRoot: string;
  clusterHome: string;
  pollMs: number;
  arrayMax: number;
  arrayWaitMs: number;
}

export class ExecutorSettingsError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ExecutorSettingsError';
  }
}

const env = (name: string): string | null => {
  const v = process.env[name]?.trim();
  return v ? v : null;
};

export function executorName(): ExecutorName {
  const v = (env('QUORUM_EXECUTOR') ?? 'local').toLowerCase();
  if (v !== 'local' && v !== 'slurm') throw new ExecutorSettingsError(`QUORUM_EXECUTOR must be local or slurm; got "${v}".`);
  return v;
}

/** The Slurm settings, checked: a bad value names the variable and what it takes. */
export function slurmSettings(): SlurmSettings {
  const cpus = Number(env('QUORUM_SLURM_CPUS') ?? 2);
  if (!Number.isInteger(cpus) || cpus < 1 || cpus > 256)
    throw new ExecutorSettingsError(`QUORUM_SLURM_CPUS must be a whole number from 1 to 256; got "${env('QUORUM_SLURM_CPUS')}".`);
  const time = env('QUORUM_SLURM_TIME') ?? '01:00:00';
  if (!/^(\d+-)?\d{1,2}(:\d{2}){0,2}$/.test(time))
    throw new ExecutorSettingsError(`QUORUM_SLURM_TIME must be a Slurm time such as 01:00:00 or 1-00:00:00; got "${time}".`);
  const mem = env('QUORUM_SLURM_MEM') ?? '4G';
  if (!/^\d+[KMGT]?$/i.test(mem)) throw new ExecutorSettingsError(`QUORUM_SLURM_MEM must be a size such as 4000M or 4G; got "${mem}".`);
  const pollMs = Number(env('QUORUM_SLURM_POLL_MS') ?? 5000);
  if (!Number.isInteger(pollMs) || pollMs < 50)
    throw new ExecutorSettingsError(`QUORUM_SLURM_POLL_MS must be a whole number ≥ 50; got "${env('QUORUM_SLURM_POLL_MS')}".`);
  const arrayMax = Number(env('QUORUM_SLURM_ARRAY_MAX') ?? 50);
  if (!Number.isInteger(arrayMax) || arrayMax < 1 || arrayMax > 1000)
    throw new ExecutorSettingsError(
      `QUORUM_SLURM_ARRAY_MAX must be a whole number from 1 to 1000; got "${env('QUORUM_SLURM_ARRAY_MAX')}".`,
    );
  const arrayWaitMs = Number(env('QUORUM_SLURM_ARRAY_WAIT_MS') ?? pollMs);
  if (!Number.isInteger(arrayWaitMs) || arrayWaitMs < 0)
    throw new ExecutorSettingsError(`QUORUM_SLURM_ARRAY_WAIT_MS must be a whole number ≥ 0; got "${env('QUORUM_SLURM_ARRAY_WAIT_MS')}".`);
  const word = (name: string) => {
    const v = env(name);
    if (v !== null && !/^[\w.,-]+$/.test(v))
      throw new ExecutorSettingsError(`${name} may hold letters, digits and . , _ - only; got "${v}".`);
    return v;
  };
  return {
    template: env('QUORUM_SLURM_TEMPLATE'),
    partition: word('QUORUM_SLURM_PARTITION'),
    account: word('QUORUM_SLURM_ACCOUNT'),
    time,
    cpus,
    mem,
    setup: (env('QUORUM_SLURM_SETUP') ?? '')
      .split(/\n|;/)
      .map((l) => l.trim())
      .filter(Boolean),
    clusterStorageRoot: env('QUORUM_CLUSTER_STORAGE_ROOT') ?? storageRoot(),
    clusterHome: env('QUORUM_CLUSTER_HOME') ?? process.cwd(),
    pollMs,
    arrayMax,
    arrayWaitMs,
  };
}

/** Jobs one worker holds at once: QUORUM_WORKER_CONCURRENCY, else 1 locally and 50 with Slurm. */
export function workerConcurrency(): number {
  const raw = env('QUORUM_WORKER_CONCURRENCY');
  if (raw === null) return executorName() === 'slurm' ? 50 : 1;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 1000)
    throw new ExecutorSettingsError(`QUORUM_WORKER_CONCURRENCY must be a whole number from 1 to 1000; got "${raw}".`);
  return n;
}
