/**
 * What a cluster job's end means for the Quorum job: a readable message, and whether a retry can
 * help (JobError, retried) or not (PermanentJobError). Slurm's job states are documented in
 * squeue(1) "JOB STATE CODES" (Slurm 22.05).
 */
import { JobError, PermanentJobError } from '@/lib/jobs/errors';
import type { ClusterJobState } from './slurm-commands';

const TERMINAL = new Set([
  'COMPLETED',
  'FAILED',
  'TIMEOUT',
  'OUT_OF_MEMORY',
  'NODE_FAIL',
  'BOOT_FAIL',
  'CANCELLED',
  'DEADLINE',
  'PREEMPTED',
  'SPECIAL_EXIT',
  'REVOKED',
]);

/** true once Slurm will not run the job any more ("CANCELLED by 0" counts as CANCELLED). */
export function isTerminal(state: string): boolean {
  return TERMINAL.has(state.split(' ')[0]!);
}

/** The exit status of "exit:signal" (scontrol's ExitCode=1:0 → 1); null when unknown. */
function exitStatus(exitCode: string | null): { status: number; signal: number } | null {
  const m = /^(\d+):(\d+)$/.exec(exitCode ?? '');
  return m ? { status: Number(m[1]), signal: Number(m[2]) } : null;
}

/**
 * The error for a cluster job that ended without COMPLETED (null for COMPLETED). `stderrTail` is
 * the last lines of the job's stderr, shown for a non-zero exit.
 */
export function clusterFailure(
  jobId: string,
  st: ClusterJobState,
  stderrTail: string,
  settings: { time: string; mem: string },
): Error | null {
  const state = st.state.split(' ')[0]!;
  const on = st.node ? ` on node ${st.node}` : '';
  const tail = stderrTail ? ` Last lines of its error output: ${stderrTail}` : '';
  switch (state) {
    case 'COMPLETED':
      return null;
    case 'TIMEOUT':
    case 'DEADLINE':
      return new PermanentJobError(
        `The cluster stopped job ${jobId}${on} at its time limit (${st.timeLimit ?? settings.time}). Ask the facility admin for a longer limit (QUORUM_SLURM_TIME) or decompose with fewer components or restarts.`,
      );
    case 'OUT_OF_MEMORY':
      return new PermanentJobError(
        `Cluster job ${jobId}${on} ran out of memory (limit ${settings.mem}). Ask the facility admin for more memory per run (QUORUM_SLURM_MEM), or crop the run.`,
      );
    case 'NODE_FAIL':
    case 'BOOT_FAIL':
      return new JobError(`The cluster node${st.node ? ` ${st.node}` : ''} running job ${jobId} failed; the job will be submitted again.`);
    case 'PREEMPTED':
      return new JobError(`Cluster job ${jobId} was preempted by higher-priority work; it will be submitted again.`);
    case 'CANCELLED':
      return new JobError(
        `Cluster job ${jobId} was cancelled on the cluster (not from Quorum), perhaps by a cluster administrator; it will be submitted again.`,
      );
    default: {
      const exit = exitStatus(st.exitCode);
      if (exit && exit.signal === 9 && /oom|out of memory/i.test(stderrTail)) {
        return new PermanentJobError(
          `Cluster job ${jobId}${on} ran out of memory (limit ${settings.mem}). Ask the facility admin for more memory per run (QUORUM_SLURM_MEM).`,
        );
      }
      const how = exit
        ? exit.signal
          ? `was killed by signal ${exit.signal}`
          : `ended with exit code ${exit.status}`
        : `ended ${state.toLowerCase()}`;
      return new PermanentJobError(`Cluster job ${jobId}${on} ${how}.${tail}`);
    }
  }
}

/** Words for the runs table: "waiting for free CPUs or memory" for Slurm's pending reason "Resources". */
export function pendingReason(reason: string | null): string {
  switch (reason) {
    case null:
    case 'None':
      return 'queued';
    case 'Resources':
      return 'waiting for free CPUs or memory';
    case 'Priority':
      return 'other jobs go first';
    case 'BeginTime':
      return 'waiting for its start time';
    case 'Dependency':
      return 'waiting for another job';
    case 'QOSMaxJobsPerUserLimit':
    case 'AssocMaxJobsLimit':
    case 'AssocGrpCpuLimit':
      return 'the account is at its job limit';
    case 'PartitionDown':
    case 'PartitionInactive':
      return 'the partition is down';
    case 'ReqNodeNotAvail':
      return 'the nodes it needs are not available';
    default:
      return `Slurm reason: ${reason}`;
  }
}

/** Seconds as "h:mm:ss" or "m:ss". */
export function elapsedText(seconds: number | null): string {
  if (seconds === null) return '—';
  const h = Math.floor(seconds / 3600),
    m = Math.floor((seconds % 3600) / 60),
    s = seconds % 60;
  return h ? `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}` : `${m}:${String(s).padStart(2, '0')}`;
}
