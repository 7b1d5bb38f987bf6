/**
 * Runs one claimed job's heavy step on Slurm: writes the batch script into the job's folder in
 * shared storage, submits it (or re-attaches to the submission stored on the job row, so a
 * restarted worker never submits twice), then polls Slurm every QUORUM_SLURM_POLL_MS while the
 * runner keeps the lease, reporting the cluster's view (pending with its reason, running on which
 * node, elapsed, and the decomposition's own stage from the job's progress file) as the job's
 * progress. Returns when the cluster job COMPLETED; throws the mapped failure otherwise. A job
 * cancelled in Quorum is cancelled on the cluster (scancel); a worker that stops or loses its
 * lease leaves the cluster job running for the next worker.
 */
import { randomBytes } from 'node:crypto';
import { mkdir, readFile, rm, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { findClusterColumns, recordClusterColumns, setClusterState } from '@/lib/db/queries/cluster-jobs';
import { storageRoot } from '@/lib/storage';
import { JobCancelled, JobError, isStopSignal } from '@/lib/jobs/errors';
import type { JobContext } from '../types';
import { loadTemplate, renderBatchScript, shellQuote } from './batch-script';
import { clusterFailure, elapsedText, isTerminal, pendingReason } from './cluster-failure';
import type { SlurmSettings } from './settings';
import { findJobByName, jobState, sbatch, scancel, type ClusterJobState } from './slurm-commands';

export interface ClusterFolders {
  /** The job's folder as this worker sees it. */
  local: string;
  /** The same folder as the cluster's nodes see it. */
  cluster: string;
}

/** The job's folder under the storage root: cluster/job-<id>/. */
export function clusterFolders(jobId: number, settings: SlurmSettings): ClusterFolders {
  const rel = path.join('cluster', `job-${jobId}`);
  return { local: path.join(storageRoot(), rel), cluster: path.posix.join(settings.clusterStorageRoot, rel.split(path.sep).join('/')) };
}

/** A storage key's path as the cluster sees it. */
export function clusterPathFor(key: string, settings: SlurmSettings): string {
  return path.posix.join(settings.clusterStorageRoot, key);
}

/** Updates the job row's cluster columns while this worker still owns the job. */
async function record(ctx: JobContext<unknown>, values: Record<string, unknown>): Promise<void> {
  await recordClusterColumns(ctx.db, { jobId: ctx.job.id, workerId: ctx.workerId, values });
}

async function lastLines(file: string, n = 5): Promise<string> {
  const text = await readFile(file, 'utf8').catch(() => '');
  return text
    .split('\n')
    .map((l) => l.trim())
    .filter(Boolean)
    .slice(-n)
    .join(' / ')
    .slice(-600);
}

function sleep(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal.aborted) return resolve();
    const done = () => {
      clearTimeout(t);
      signal.removeEventListener('abort', done);
      resolve();
    };
    const t = setTimeout(done, ms);
    signal.addEventListener('abort', done, { once: true });
  });
}

/** The engine's progress written by `quorum decompose --progress FILE` on the node, if any. */
async function nodeProgress(file: string): Promise<{ stage: string; percent: number; detail?: string } | null> {
  try {
    const p = JSON.parse(await readFile(file, 'utf8')) as { stage?: unknown; percent?: unknown; detail?: unknown };
    if (typeof p.stage !== 'string' || typeof p.percent !== 'number') return null;
    return { stage: p.stage, percent: p.percent, detail: typeof p.detail === 'string' ? p.detail : undefined };
  } catch {
    return null;
  }
}

export interface SlurmStep {
  /** Arguments after `quorum` (paths as the cluster sees them); gets the job's cluster folder. */
  args: (folders: ClusterFolders) => string[];
  /** Maps the node's progress (engine percent 0..100) into the job's percent. */
  percentOf?: (enginePercent: number) => number;
  /** Maps the engine's stage names into the job's. */
  stageOf?: (engineStage: string) => string;
  /** Writes the command's input files into the fresh job folder before sbatch (not on re-attach). */
  prepare?: (folders: ClusterFolders) => Promise<void>;
}

/** Submits (or re-attaches) and waits for the cluster job; returns the folders and the cluster job id. */
export async function runOnSlurm(
  ctx: JobContext<unknown>,
  settings: SlurmSettings,
  step: SlurmStep,
): Promise<{ folders: ClusterFolders; clusterJobId: string }> {
  const folders = clusterFolders(ctx.job.id, settings);
  const row = await findClusterColumns(ctx.db, { jobId: ctx.job.id });
  let clusterJobId = row?.cluster_job_id ?? null;
  if (!clusterJobId && row?.cluster_name) {
    // a worker died between sbatch and storing the id: find its submission by the unique name
    clusterJobId = await findJobByName(row.cluster_name).catch(() => null);
    if (clusterJobId) await record(ctx, { cluster_job_id: clusterJobId });
  }
  if (clusterJobId) {
    ctx.logger.info(`job ${ctx.job.id}: re-attached to cluster job ${clusterJobId}`);
  } else {
    clusterJobId = await submit(ctx, settings, step, folders);
  }

  const percentOf = step.percentOf ?? ((p: number) => p);
  const stageOf = step.stageOf ?? ((s: string) => s);
  let unknown = 0;
  try {
    for (;;) {
      ctx.throwIfStopped();
      let st: ClusterJobState | null;
      try {
        st = await jobState(clusterJobId);
      } catch (err) {
        // the controller does not answer: keep the job (and its lease) and ask again
        await ctx.progress('cluster unreachable', 1, `The cluster does not answer (${(err as Error).message}); asking again.`);
        await sleep(settings.pollMs, ctx.signal);
        continue;
      }
      if (!st) {
        unknown++;
        if (unknown >= 3) {
          await record(ctx, { cluster_job_id: null, cluster_name: null, cluster_state: 'UNKNOWN' });
          throw new JobError(
            `The cluster no longer knows job ${clusterJobId} (purged before Quorum saw it end); it will be submitted again.`,
          );
        }
      } else {
        unknown = 0;
        const state = st.state.split(' ')[0]!;
        await record(ctx, {
          cluster_state: state.slice(0, 32),
          cluster_reason: st.reason?.slice(0, 255) ?? null,
          cluster_node: st.node?.slice(0, 255) ?? null,
          cluster_elapsed_s: st.elapsedSeconds,
        });
        if (isTerminal(state)) {
          const failure = clusterFailure(clusterJobId, st, await lastLines(path.join(folders.local, 'stderr.txt')), settings);
          if (!failure) return { folders, clusterJobId };
          // the next attempt (if any) submits afresh
          await record(ctx, { cluster_job_id: null, cluster_name: null });
          throw failure;
        }
        if (state === 'PENDING' || state === 'CONFIGURING' || state === 'REQUEUED' || state === 'SUSPENDED') {
          await ctx.progress(
            'cluster pending',
            1,
            `Pending on the cluster (job ${clusterJobId}): ${state === 'SUSPENDED' ? 'suspended' : pendingReason(st.reason)}.`,
          );
        } else {
          const p = await nodeProgress(path.join(folders.local, 'progress.json'));
          const where = `running on ${st.node ?? 'the cluster'} for ${elapsedText(st.elapsedSeconds)} (cluster job ${clusterJobId})`;
          await ctx.progress(
            p ? stageOf(p.stage) : 'cluster running',
            p ? percentOf(p.percent) : 3,
            `${where[0]!.toUpperCase()}${where.slice(1)}${p?.detail ? ` · ${p.detail}` : ''}`,
          );
        }
      }
      await sleep(settings.pollMs, ctx.signal);
    }
  } catch (err) {
    if (err instanceof JobCancelled || (isStopSignal(err) && ctx.signal.reason instanceof JobCancelled)) {
      await scancel(clusterJobId).then(
        () => ctx.logger.info(`job ${ctx.job.id}: cancelled cluster job ${clusterJobId}`),
        (e: unknown) => ctx.logger.warn(`job ${ctx.job.id}: scancel ${clusterJobId} failed: ${(e as Error).message}`),
      );
      await setClusterState(ctx.db, { jobId: ctx.job.id, state: 'CANCELLED' });
    }
    throw err;
  }
}

async function submit(ctx: JobContext<unknown>, settings: SlurmSettings, step: SlurmStep, folders: ClusterFolders): Promise<string> {
  await rm(folders.local, { recursive: true, force: true });
  await mkdir(folders.local, { recursive: true });
  await step.prepare?.(folders);
  const command = ['npm', 'run', '-s', 'quorum', '--', ...step.args(folders)].map(shellQuote).join(' ');
  // the command alone, for an array task to run (an array's one script reads it from here)
  await writeFile(path.join(folders.local, 'command.sh'), `${command}\n`);
  if (settings.arrayMax <= 1) return submitOne(ctx, settings, folders, command);
  return new Promise<string>((resolve, reject) => joinArray({ ctx, settings, folders, command, resolve, reject }));
}

async function batchScript(settings: SlurmSettings, v: { name: string; stdout: string; stderr: string; command: string }): Promise<string> {
  return renderBatchScript(await loadTemplate(settings.template), {
    job_name: v.name,
    partition: settings.partition,
    account: settings.account,
    time: settings.time,
    cpus: String(settings.cpus),
    mem: settings.mem,
    stdout: v.stdout,
    stderr: v.stderr,
    workdir: shellQuote(path.posix.dirname(v.stdout)),
    quorum_home: shellQuote(settings.clusterHome),
    setup: settings.setup.join('\n'),
    command: v.command,
  });
}

/** One cluster job for one Quorum job. */
async function submitOne(ctx: JobContext<unknown>, settings: SlurmSettings, folders: ClusterFolders, command: string): Promise<string> {
  const name = `quorum-j${ctx.job.id}-${randomBytes(4).toString('hex')}`;
  const script = await batchScript(settings, {
    name,
    stdout: path.posix.join(folders.cluster, 'stdout.txt'),
    stderr: path.posix.join(folders.cluster, 'stderr.txt'),
    command,
  });
  const scriptPath = path.join(folders.local, 'job.sh');
  await writeFile(scriptPath, script, { mode: 0o755 });
  // the name first, so a worker that dies inside sbatch leaves a trace the next one can find
  await record(ctx, {
    executor: 'slurm',
    cluster_name: name,
    cluster_job_id: null,
    cluster_state: 'SUBMITTING',
    cluster_reason: null,
    cluster_node: null,
    cluster_elapsed_s: null,
  });
  ctx.throwIfStopped();
  const id = await sbatch(scriptPath).catch((err: unknown) => {
    throw new JobError(`The cluster refused the job: ${(err as Error).message}`, { cause: err });
  });
  await record(ctx, { cluster_job_id: id, cluster_state: 'PENDING' });
  ctx.logger.info(`job ${ctx.job.id}: submitted as cluster job ${id} (${name})`);
  return id;
}

interface ArrayMember {
  ctx: JobContext<unknown>;
  settings: SlurmSettings;
  folders: ClusterFolders;
  command: string;
  resolve: (id: string) => void;
  reject: (err: unknown) => void;
}

/**
 * Submissions of this process that arrive within QUORUM_SLURM_ARRAY_WAIT_MS of the first one
 * (at most QUORUM_SLURM_ARRAY_MAX; a full batch goes at once) share one `sbatch --array`.
 */
let gathering: { members: ArrayMember[]; timer: NodeJS.Timeout } | null = null;

function joinArray(m: ArrayMember): void {
  if (!gathering) gathering = { members: [], timer: setTimeout(flushArray, m.settings.arrayWaitMs) };
  gathering.members.push(m);
  if (gathering.members.length >= m.settings.arrayMax) flushArray();
}

function flushArray(): void {
  if (!gathering) return;
  const { members, timer } = gathering;
  gathering = null;
  clearTimeout(timer);
  const live = members.filter((m) => {
    if (!m.ctx.signal.aborted) return true;
    m.reject(
      m.ctx.signal.reason instanceof Error ? m.ctx.signal.reason : new JobError('The job stopped before it was submitted to the cluster.'),
    );
    return false;
  });
  if (live.length === 1) {
    const m = live[0]!;
    void submitOne(m.ctx, m.settings, m.folders, m.command).then(m.resolve, m.reject);
  } else if (live.length > 1) {
    void submitArray(live).catch((err: unknown) => live.forEach((m) => m.reject(err)));
  }
}

/**
 * One cluster job array for several Quorum jobs: task i reads line i+1 of list.txt (its job's
 * cluster folder), sends its output to that folder's stdout.txt/stderr.txt and runs the folder's
 * command.sh. Each Quorum job keeps "<array id>_<i>" as its cluster job, so polling, failures,
 * scancel and re-attaching work per task.
 */
async function submitArray(members: ArrayMember[]): Promise<void> {
  const settings = members[0]!.settings;
  const hex = randomBytes(4).toString('hex');
  const name = `quorum-a${hex}`;
  const rel = path.join('cluster', `array-${hex}`);
  const dir = {
    local: path.join(storageRoot(), rel),
    cluster: path.posix.join(settings.clusterStorageRoot, rel.split(path.sep).join('/')),
  };
  await mkdir(dir.local, { recursive: true });
  const list = path.posix.join(dir.cluster, 'list.txt');
  await writeFile(path.join(dir.local, 'list.txt'), members.map((m) => `${m.folders.cluster}\n`).join(''));
  const command = [
    `dir=$(sed -n "$((SLURM_ARRAY_TASK_ID + 1))p" ${shellQuote(list)})`,
    'exec >"$dir/stdout.txt" 2>"$dir/stderr.txt"',
    '. "$dir/command.sh"',
  ].join('\n');
  const script = await batchScript(settings, {
    name,
    stdout: path.posix.join(dir.cluster, 'task-%a.out'),
    stderr: path.posix.join(dir.cluster, 'task-%a.err'),
    command,
  });
  const scriptPath = path.join(dir.local, 'job.sh');
  await writeFile(scriptPath, script, { mode: 0o755 });
  await Promise.all(
    members.map((m, i) =>
      record(m.ctx, {
        executor: 'slurm',
        cluster_name: `${name}#${i}`,
        cluster_job_id: null,
        cluster_state: 'SUBMITTING',
        cluster_reason: null,
        cluster_node: null,
        cluster_elapsed_s: null,
      }),
    ),
  );
  const id = await sbatch(scriptPath, [`--array=0-${members.length - 1}`]).catch((err: unknown) => {
    throw new JobError(`The cluster refused the job array: ${(err as Error).message}`, { cause: err });
  });
  await Promise.all(
    members.map(async (m, i) => {
      await record(m.ctx, { cluster_job_id: `${id}_${i}`, cluster_state: 'PENDING' });
      m.ctx.logger.info(
        `job ${m.ctx.job.id}: submitted as cluster job ${id}_${i} (task ${i} of array ${id}, ${members.length} tasks, ${name})`,
      );
      m.resolve(`${id}_${i}`);
    }),
  );
}
