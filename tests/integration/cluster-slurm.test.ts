// The Slurm executor (issue 17) against a real single-node Slurm from Debian's packages
// (slurmctld, slurmd, munge), started on loopback ports by scripts/slurm.sh with its state under
// .data/slurm/ (npm test starts it; this file starts it itself when it is not running and stops
// what it started). Workers run as processes with QUORUM_EXECUTOR=slurm; the cluster jobs run
// `quorum decompose` or `quorum denoise` on the node, alone or as tasks of one job array. Jobs that must stay running until the test says so wait for a
// gate file (QUORUM_SLURM_SETUP), so no verdict depends on how fast anything runs.
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { readFile, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { closeDb, db, parseJson } from '@/lib/db/knex';
import { cancelJob, getJob } from '@/lib/jobs';
import { queueDecomposition } from '@/lib/runs/queue-job';
import { enqueueDenoise } from '@/lib/jobs/queue-denoise';
import type { DenoiseResult } from '@/lib/denoise/schema';
import { pathFor } from '@/lib/storage';
import { createPhantomRun, useTempUploads } from './helpers/factories';
import { spawnWorker, waitFor, type WorkerProcess } from './helpers/worker-process';

const root = path.resolve(import.meta.dirname, '../..');
const slurmScript = path.join(root, 'scripts/slurm.sh');
const conf = process.env.SLURM_CONF ?? path.join(root, '.data/slurm/slurm.conf');

const running = () => spawnSync('bash', [slurmScript, 'status'], { encoding: 'utf8' }).status === 0;
let startedHere = false;
let skipWhy: string | null = null;
if (process.platform !== 'linux') skipWhy = 'Slurm tests need Linux with Debian packages';
else if (!running()) {
  const r = spawnSync('bash', [slurmScript, 'start'], { encoding: 'utf8', timeout: 300_000 });
  if (r.status === 0) startedHere = true;
  else skipWhy = `Slurm could not be started here: ${(r.stderr || r.stdout).trim().split('\n').slice(-2).join(' ')}`;
}
if (skipWhy) console.warn(`cluster-slurm tests skipped: ${skipWhy}`);

const slurmEnv = { SLURM_CONF: conf };
const scontrol = (id: string) =>
  execFileSync('scontrol', ['show', 'job', '-o', id], { env: { ...process.env, ...slurmEnv }, encoding: 'utf8' });
const squeueAll = () =>
  execFileSync('squeue', ['-h', '-t', 'all', '-o', '%i %j'], { env: { ...process.env, ...slurmEnv }, encoding: 'utf8' })
    .split('\n')
    .filter(Boolean)
    .map((l) => l.split(' ') as [string, string]);
/** Names of the cluster jobs Slurm knows, leaving out those it knew before (earlier runs of this file reuse Quorum job ids while Slurm keeps ended jobs for MinJobAge). */
const jobNames = (before: ReadonlySet<string> = new Set()) =>
  squeueAll()
    .filter(([id]) => !before.has(id))
    .map(([, name]) => name);
const knownIds = () => new Set(squeueAll().map(([id]) => id));

let uploads: Awaited<ReturnType<typeof useTempUploads>>;
const workers: WorkerProcess[] = [];

function slurmWorker(extra: Record<string, string> = {}, args: string[] = ['--once']): WorkerProcess {
  const w = spawnWorker({
    uploadsDir: uploads.dir,
    args,
    env: {
      ...slurmEnv,
      QUORUM_EXECUTOR: 'slurm',
      QUORUM_SLURM_POLL_MS: '200',
      QUORUM_SLURM_CPUS: '1',
      QUORUM_SLURM_MEM: '1000M',
      QUORUM_SLURM_TIME: '00:10:00',
      QUORUM_CLUSTER_HOME: root,
      QUORUM_JOB_RETRY_BASE_MS: '0',
      ...extra,
    },
  });
  workers.push(w);
  return w;
}

/** A setup line that holds the cluster job until the test writes the gate file. */
const gateLine = (gate: string) => `while [ ! -e ${gate} ]; do sleep 0.2; done`;

const jobRow = (id: number) =>
  db('jobs')
    .where({ id })
    .first('status', 'message', 'stage', 'cluster_job_id', 'cluster_name', 'cluster_state', 'cluster_node', 'executor');

beforeAll(async () => {
  uploads = await useTempUploads();
});
afterAll(async () => {
  for (const w of workers) if (w.child.exitCode === null && w.child.signalCode === null) w.child.kill('SIGKILL');
  // leave none of this file's cluster jobs running (and nobody else's touched)
  for (const id of submitted) spawnSync('scancel', [id], { env: { ...process.env, ...slurmEnv } });
  if (startedHere) spawnSync('bash', [slurmScript, 'stop']);
  await uploads.cleanup();
  await closeDb();
});
const submitted = new Set<string>();
afterEach(async () => {
  for (const r of await db('jobs').whereNotNull('cluster_job_id').select('cluster_job_id')) submitted.add(String(r.cluster_job_id));
});
beforeEach(async () => {
  await db('jobs').del();
});

describe.skipIf(skipWhy !== null)('decompose through Slurm', () => {
  it('a run is decomposed on the cluster and becomes rateable with exactly one set of components', { timeout: 300_000 }, async () => {
    const { runId } = await createPhantomRun(db, { size: 'tiny', raters: 2, raters_per_run: 2 });
    const { jobId } = await queueDecomposition(db, { runId });
    const w = slurmWorker();
    const exit = await w.exited;
    expect(exit.code, w.lines.join('\n')).toBe(0);

    const job = await getJob(db, jobId);
    expect(job?.status, job?.message ?? '').toBe('succeeded');
    const row = await jobRow(jobId);
    expect(row.executor).toBe('slurm');
    expect(row.cluster_state).toBe('COMPLETED');
    // Slurm itself says the job ran and completed (its record is kept MinJobAge = 600 s)
    const clusterJobId = (job!.result as { clusterJobId: string }).clusterJobId;
    expect(scontrol(clusterJobId)).toMatch(/JobState=COMPLETED .*ExitCode=0:0/);

    const run = await db('runs').where({ id: runId }).first('status');
    expect(run.status).toBe('ready');
    const decs = await db('decompositions').where({ run_id: runId });
    expect(decs).toHaveLength(1);
    expect(decs[0].is_current).toBeTruthy();
    const params = parseJson<Record<string, unknown>>(decs[0].parameters)!;
    expect(params).toMatchObject({ executor: 'slurm', clusterJobId });
    const comps = await db('components').where({ decomposition_id: decs[0].id }).count({ n: '*' }).first();
    expect(Number(comps!.n)).toBe(decs[0].k);
    expect(decs[0].k).toBeGreaterThanOrEqual(2);
    expect(await db('assignments').where({ run_id: runId }).count({ n: '*' }).first()).toMatchObject({ n: 2 });
  });

  it('a cluster job killed by its time limit ends failed with that reason', { timeout: 400_000 }, async () => {
    const { runId } = await createPhantomRun(db, { size: 'tiny', raters: 1 });
    const { jobId } = await queueDecomposition(db, { runId });
    // Slurm's smallest limit is one minute; the gate never opens, so the limit ends the job
    const w = slurmWorker({ QUORUM_SLURM_TIME: '00:01:00', QUORUM_SLURM_SETUP: gateLine(path.join(uploads.dir, 'never')) });
    const exit = await w.exited;
    expect(exit.code, w.lines.join('\n')).toBe(0);
    const job = await getJob(db, jobId);
    expect(job?.status).toBe('failed');
    expect(job?.message).toMatch(/^The cluster stopped job \d+ on node \S+ at its time limit \(00:01:00\)/);
    expect(job?.attempts).toBe(1); // a time limit is not retried: the same run would hit it again
    const run = await db('runs').where({ id: runId }).first('status', 'status_message');
    expect(run).toMatchObject({ status: 'failed', status_message: job?.message });
    expect((await jobRow(jobId)).cluster_state).toBe('TIMEOUT');
    expect(await db('decompositions').where({ run_id: runId })).toHaveLength(0);
  });

  it('cancelling the job in Quorum cancels the cluster job (scancel)', { timeout: 300_000 }, async () => {
    const { runId } = await createPhantomRun(db, { size: 'tiny', raters: 1 });
    const { jobId } = await queueDecomposition(db, { runId });
    const w = slurmWorker({ QUORUM_SLURM_SETUP: gateLine(path.join(uploads.dir, 'never')) });
    // the runs table's words while the cluster job runs: node and elapsed time
    const seen = await waitFor(
      async () => {
        const r = await jobRow(jobId);
        return r?.cluster_state === 'RUNNING' && /^Running on \S+ for \d+:\d\d \(cluster job \d+\)/.test(r.message ?? '') ? r : null;
      },
      { timeoutMs: 120_000, everyMs: 100 },
    );
    expect(await cancelJob(db, jobId)).toBe('cancelling');
    const exit = await w.exited;
    expect(exit.code, w.lines.join('\n')).toBe(0);
    const after = await waitFor(
      async () => {
        const out = scontrol(seen.cluster_job_id);
        return /JobState=CANCELLED/.test(out) ? out : null;
      },
      { timeoutMs: 60_000, everyMs: 200 },
    );
    expect(after).toMatch(/JobState=CANCELLED/);
    expect((await jobRow(jobId)).cluster_state).toBe('CANCELLED');
    expect((await db('runs').where({ id: runId }).first('status')).status).toBe('cancelled');
    expect(w.lines.join('\n')).toMatch(new RegExp(`cancelled cluster job ${seen.cluster_job_id}`));
  });

  it(
    'a worker killed while its cluster job runs: a new worker re-attaches, never submits again, and imports once',
    { timeout: 300_000 },
    async () => {
      const { runId } = await createPhantomRun(db, { size: 'tiny', raters: 1 });
      const { jobId } = await queueDecomposition(db, { runId });
      const gate = path.join(uploads.dir, `gate-${jobId}`);
      const lease = { QUORUM_JOB_LEASE_MS: '1500', QUORUM_SLURM_SETUP: gateLine(gate) };
      const before = knownIds();
      const first = slurmWorker(lease, []);
      const r1 = await waitFor(
        async () => {
          const r = await jobRow(jobId);
          return r?.cluster_state === 'RUNNING' ? r : null;
        },
        { timeoutMs: 120_000, everyMs: 100 },
      );
      first.child.kill('SIGKILL');
      await first.exited;

      const second = slurmWorker(lease);
      await waitFor(async () => second.lines.some((l) => l.includes(`re-attached to cluster job ${r1.cluster_job_id}`)), {
        timeoutMs: 60_000,
        everyMs: 100,
      });
      await writeFile(gate, '');
      const exit = await second.exited;
      expect(exit.code, second.lines.join('\n')).toBe(0);

      const job = await getJob(db, jobId);
      expect(job?.status, job?.message ?? '').toBe('succeeded');
      expect((job!.result as { clusterJobId: string }).clusterJobId).toBe(r1.cluster_job_id);
      expect(job!.attempts).toBe(2); // the lost attempt and the re-attached one
      // one submission: Slurm knows one job by this job's name
      expect(jobNames().filter((n) => n === r1.cluster_name)).toHaveLength(1);
      expect(jobNames(before).filter((n) => n.startsWith(`quorum-j${jobId}-`))).toHaveLength(1);
      expect(second.lines.join('\n')).not.toMatch(/submitted as cluster job/);
      expect(await db('decompositions').where({ run_id: runId })).toHaveLength(1);
      expect((await db('runs').where({ id: runId }).first('status')).status).toBe('ready');
      expect(existsSync(gate)).toBe(true);
    },
  );

  it('a job cancelled while its worker was dead: the next worker cancels the orphaned cluster job', { timeout: 300_000 }, async () => {
    const { runId } = await createPhantomRun(db, { size: 'tiny', raters: 1 });
    const { jobId } = await queueDecomposition(db, { runId });
    const env = { QUORUM_JOB_LEASE_MS: '1500', QUORUM_SLURM_SETUP: gateLine(path.join(uploads.dir, 'never')) };
    const first = slurmWorker(env, []);
    const r1 = await waitFor(
      async () => {
        const r = await jobRow(jobId);
        return r?.cluster_state === 'RUNNING' ? r : null;
      },
      { timeoutMs: 120_000, everyMs: 100 },
    );
    first.child.kill('SIGKILL');
    await first.exited;
    await cancelJob(db, jobId);
    const second = slurmWorker(env);
    const exit = await second.exited;
    expect(exit.code, second.lines.join('\n')).toBe(0);
    expect(second.lines.join('\n')).toContain(`cancelled cluster job ${r1.cluster_job_id}`);
    expect(
      await waitFor(async () => (/JobState=CANCELLED/.test(scontrol(r1.cluster_job_id)) ? true : null), {
        timeoutMs: 60_000,
        everyMs: 200,
      }),
    ).toBe(true);
    expect((await jobRow(jobId)).cluster_state).toBe('CANCELLED');
    expect((await db('runs').where({ id: runId }).first('status')).status).toBe('cancelled');
  });
});

describe.skipIf(skipWhy !== null)('denoise through Slurm', () => {
  it('a denoise job run on the cluster stores the very file the worker itself writes', { timeout: 400_000 }, async () => {
    const { runId, studyId, leadId } = await createPhantomRun(db, { size: 'tiny', raters: 1 });
    await queueDecomposition(db, { runId });
    const d = await slurmWorker().exited;
    expect(d.code).toBe(0);
    const dec = await db('decompositions').where({ run_id: runId, is_current: true }).first('id', 'k');
    expect(dec, 'the run was decomposed').toBeTruthy();
    // components 1 and 3 decided noise, the rest signal: the noise list is [1, 3]
    for (const c of await db('components').where({ decomposition_id: dec.id }).select('id', 'idx')) {
      const label = c.idx === 1 || c.idx === 3 ? 'noise' : 'signal';
      await db('decisions')
        .insert({ component_id: c.id, run_id: runId, label, method: 'unanimous' })
        .onConflict('component_id')
        .merge(['label', 'method']);
    }

    const onCluster = await enqueueDenoise({ payload: { runId, mode: 'partial', includeMotion: false }, studyId, createdBy: leadId });
    const w = slurmWorker();
    expect((await w.exited).code, w.lines.join('\n')).toBe(0);
    const cj = await getJob(db, onCluster.jobId);
    expect(cj?.status, cj?.message ?? '').toBe('succeeded');
    const row = await jobRow(onCluster.jobId);
    expect(row).toMatchObject({ executor: 'slurm', cluster_state: 'COMPLETED' });
    expect(scontrol(row.cluster_job_id)).toMatch(/JobState=COMPLETED .*ExitCode=0:0/);
    const a = cj!.result as DenoiseResult & { clusterJobId: string };
    expect(a.clusterJobId).toBe(row.cluster_job_id);
    expect(a.noise).toEqual([1, 3]);

    // the same request computed by a worker with the local executor
    const here = await enqueueDenoise({ payload: { runId, mode: 'partial', includeMotion: false }, studyId, createdBy: leadId });
    const l = spawnWorker({ uploadsDir: uploads.dir, env: { QUORUM_EXECUTOR: 'local' } });
    workers.push(l);
    expect((await l.exited).code, l.lines.join('\n')).toBe(0);
    const lj = await getJob(db, here.jobId);
    expect(lj?.status, lj?.message ?? '').toBe('succeeded');
    expect((await jobRow(here.jobId)).cluster_job_id).toBeNull();
    const b = lj!.result as DenoiseResult;

    expect(a.key).not.toBe(b.key);
    const sha = async (key: string) =>
      createHash('sha256')
        .update(await readFile(pathFor(key)))
        .digest('hex');
    // the files on disk are byte for byte the same, and each matches the checksum its job recorded
    expect(await sha(a.key)).toBe(await sha(b.key));
    expect(await sha(a.key)).toBe(a.sha256);
    expect(await sha(b.key)).toBe(b.sha256);
    expect({ ...a, key: '', clusterJobId: undefined }).toEqual({ ...b, key: '', clusterJobId: undefined });
  });
});

describe.skipIf(skipWhy !== null)('runs that arrive together go as one job array', () => {
  // QUORUM_SLURM_ARRAY_MAX = the number of runs and a wait far longer than any test: the array is
  // sent when the last run joins it, not when a timer fires, so no verdict depends on speed
  const arrayEnv = (n: number, extra: Record<string, string> = {}) => ({
    QUORUM_SLURM_ARRAY_MAX: String(n),
    QUORUM_SLURM_ARRAY_WAIT_MS: '600000',
    ...extra,
  });
  const taskOf = (out: string) => /ArrayJobId=(\d+) ArrayTaskId=(\d+)/.exec(out)?.slice(1, 3);

  it(
    'three runs queued together: one sbatch --array with three tasks, each run ready with one set of components',
    { timeout: 400_000 },
    async () => {
      const runs = [];
      for (let i = 0; i < 3; i++) runs.push(await createPhantomRun(db, { size: 'tiny', raters: 1, seed: 11 + i }));
      const jobIds = [];
      for (const r of runs) jobIds.push((await queueDecomposition(db, { runId: r.runId })).jobId);
      const w = slurmWorker(arrayEnv(3));
      const exit = await w.exited;
      expect(exit.code, w.lines.join('\n')).toBe(0);

      const rows = await Promise.all(jobIds.map((id) => jobRow(id)));
      const ids = rows.map((r) => String(r.cluster_job_id));
      const arrayId = ids[0]!.split('_')[0]!;
      expect(ids.slice().sort()).toEqual([0, 1, 2].map((i) => `${arrayId}_${i}`));
      // one submission: the worker said so once per task, all naming the same array of 3 tasks
      expect(w.lines.filter((l) => /submitted as cluster job/.test(l))).toHaveLength(3);
      expect(w.lines.filter((l) => l.includes(`of array ${arrayId}, 3 tasks`))).toHaveLength(3);
      expect(new Set(rows.map((r) => String(r.cluster_name).split('#')[0])).size).toBe(1);
      for (const [i, id] of jobIds.entries()) {
        const job = await getJob(db, id);
        expect(job?.status, job?.message ?? '').toBe('succeeded');
        expect(rows[i]!.cluster_state).toBe('COMPLETED');
        // Slurm's own record of the task: part of that array, completed
        const out = scontrol(ids[i]!);
        expect(taskOf(out)).toEqual([arrayId, ids[i]!.split('_')[1]]);
        expect(out).toMatch(/JobState=COMPLETED .*ExitCode=0:0/);
        expect((await db('runs').where({ id: runs[i]!.runId }).first('status')).status).toBe('ready');
        const decs = await db('decompositions').where({ run_id: runs[i]!.runId });
        expect(decs).toHaveLength(1);
        const n = await db('components').where({ decomposition_id: decs[0].id }).count({ n: '*' }).first();
        expect(Number(n!.n)).toBe(decs[0].k);
        expect(decs[0].k).toBeGreaterThanOrEqual(2);
      }
    },
  );

  it('cancelling one run of an array cancels only its task (scancel <array>_<task>)', { timeout: 400_000 }, async () => {
    const a = await createPhantomRun(db, { size: 'tiny', raters: 1, seed: 21 });
    const b = await createPhantomRun(db, { size: 'tiny', raters: 1, seed: 22 });
    const ja = (await queueDecomposition(db, { runId: a.runId })).jobId;
    const jb = (await queueDecomposition(db, { runId: b.runId })).jobId;
    const gate = path.join(uploads.dir, `gate-array-${ja}`);
    const w = slurmWorker(arrayEnv(2, { QUORUM_SLURM_SETUP: gateLine(gate) }));
    const running = await waitFor(
      async () => {
        const r = await Promise.all([jobRow(ja), jobRow(jb)]);
        return r.every((x) => x?.cluster_state === 'RUNNING') ? r : null;
      },
      { timeoutMs: 120_000, everyMs: 100 },
    );
    const [ta, tb] = running.map((r) => String(r.cluster_job_id));
    expect(ta!.split('_')[0]).toBe(tb!.split('_')[0]);
    expect(await cancelJob(db, ja)).toBe('cancelling');
    await waitFor(async () => (/JobState=CANCELLED/.test(scontrol(ta!)) ? true : null), { timeoutMs: 60_000, everyMs: 200 });
    expect(scontrol(tb!)).toMatch(/JobState=RUNNING/);
    await writeFile(gate, '');
    const exit = await w.exited;
    expect(exit.code, w.lines.join('\n')).toBe(0);
    expect(w.lines.join('\n')).toContain(`cancelled cluster job ${ta}`);
    expect((await getJob(db, ja))?.status).toBe('cancelled');
    expect((await getJob(db, jb))?.status).toBe('succeeded');
    expect(scontrol(tb!)).toMatch(/JobState=COMPLETED/);
    expect((await db('runs').where({ id: b.runId }).first('status')).status).toBe('ready');
    expect((await db('runs').where({ id: a.runId }).first('status')).status).toBe('cancelled');
  });
});

describe.skipIf(skipWhy !== null)('re-attaching to array tasks', () => {
  it(
    'a worker killed while its array runs: the next worker re-attaches to each task, submits nothing, and imports each run once',
    { timeout: 400_000 },
    async () => {
      const a = await createPhantomRun(db, { size: 'tiny', raters: 1, seed: 31 });
      const b = await createPhantomRun(db, { size: 'tiny', raters: 1, seed: 32 });
      const jobIds = [(await queueDecomposition(db, { runId: a.runId })).jobId, (await queueDecomposition(db, { runId: b.runId })).jobId];
      const gate = path.join(uploads.dir, `gate-reattach-${jobIds[0]}`);
      const env = {
        QUORUM_SLURM_ARRAY_MAX: '2',
        QUORUM_SLURM_ARRAY_WAIT_MS: '600000',
        QUORUM_JOB_LEASE_MS: '1500',
        QUORUM_SLURM_SETUP: gateLine(gate),
      };
      const first = slurmWorker(env, []);
      const rows = await waitFor(
        async () => {
          const r = await Promise.all(jobIds.map((id) => jobRow(id)));
          return r.every((x) => x?.cluster_state === 'RUNNING') ? r : null;
        },
        { timeoutMs: 120_000, everyMs: 100 },
      );
      first.child.kill('SIGKILL');
      await first.exited;
      const tasks = rows.map((r) => String(r.cluster_job_id));
      const arrayName = String(rows[0]!.cluster_name).split('#')[0]!;

      const second = slurmWorker(env);
      await waitFor(async () => tasks.every((t) => second.lines.some((l) => l.includes(`re-attached to cluster job ${t}`))), {
        timeoutMs: 60_000,
        everyMs: 100,
      });
      await writeFile(gate, '');
      const exit = await second.exited;
      expect(exit.code, second.lines.join('\n')).toBe(0);
      expect(second.lines.join('\n')).not.toMatch(/submitted as cluster job/);
      // Slurm knows the array's two tasks, submitted once (the second worker sent nothing)
      expect(jobNames().filter((n) => n === arrayName)).toHaveLength(2);
      for (const [i, id] of jobIds.entries()) {
        const job = await getJob(db, id);
        expect(job?.status, job?.message ?? '').toBe('succeeded');
        expect((job!.result as { clusterJobId: string }).clusterJobId).toBe(tasks[i]);
        expect(await db('decompositions').where({ run_id: [a, b][i]!.runId })).toHaveLength(1);
      }
    },
  );
});
