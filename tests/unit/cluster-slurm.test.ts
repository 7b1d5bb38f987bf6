// The Slurm executor's pure parts: reading `scontrol show job -o`, durations, failure messages,
// the batch script template and the CLI flags. The scontrol lines are output of Slurm 22.05.8
// (Debian bookworm's slurmctld) captured on this project's test cluster (scripts/slurm.sh); the
// duration format is Slurm's documented "[days-]hours:minutes:seconds" (sbatch(1), --time).
import { describe, expect, it } from 'vitest';
import { DEFAULT_TEMPLATE, renderBatchScript, shellQuote } from '@/lib/worker/executors/batch-script';
import { clusterFailure, elapsedText, isTerminal, pendingReason } from '@/lib/worker/executors/cluster-failure';
import { decomposeFlags } from '@/lib/worker/executors/decompose-on-slurm';
import { timecoursesTsv } from '@/lib/worker/executors/denoise-on-slurm';
import { ExecutorSettingsError, slurmSettings } from '@/lib/worker/executors/settings';
import { parseTsv } from '@/lib/exports/tabular';
import { parseScontrol, slurmSeconds } from '@/lib/worker/executors/slurm-commands';
import { JobError, PermanentJobError } from '@/lib/jobs/errors';
import { icaRunFraction } from '@/lib/decomposition/pipeline';

const completed =
  'JobId=4 JobName=quorum-j2-815b86ca UserId=root(0) GroupId=root(0) MCS_label=N/A Priority=4294901757 Nice=0 Account=(null) QOS=(null) JobState=COMPLETED Reason=None Dependency=(null) Requeue=1 Restarts=0 BatchFlag=1 Reboot=0 ExitCode=0:0 RunTime=00:00:27 TimeLimit=00:10:00 TimeMin=N/A AllocNode:Sid=localhost:26117 ReqNodeList=(null) ExcNodeList=(null) NodeList=vm BatchHost=vm NumNodes=1 NumCPUs=1 StdErr=/tmp/quorum-uploads-I3t6EP/cluster/job-2/stderr.txt';
const pending =
  'JobId=1 JobName=a.sh UserId=root(0) GroupId=root(0) MCS_label=N/A Priority=4294901759 Nice=0 Account=(null) QOS=(null) JobState=PENDING Reason=None Dependency=(null) Requeue=1 Restarts=0 BatchFlag=1 Reboot=0 ExitCode=0:0 RunTime=00:00:00 TimeLimit=00:01:00 TimeMin=N/A SubmitTime=2026-12-02T15:07:17 ReqNodeList=(null) ExcNodeList=(null) NodeList= NumNodes=1 NumCPUs=1';

describe('scontrol show job -o', () => {
  it('reads state, reason, node, run time, exit code, limit and stderr path', () => {
    expect(parseScontrol(completed)).toEqual({
      state: 'COMPLETED',
      reason: null,
      node: 'vm',
      elapsedSeconds: 27,
      exitCode: '0:0',
      timeLimit: '00:10:00',
      stderrPath: '/tmp/quorum-uploads-I3t6EP/cluster/job-2/stderr.txt',
    });
    // NodeList is empty while pending, and ReqNodeList must not be read as NodeList
    expect(parseScontrol(pending)).toMatchObject({ state: 'PENDING', reason: null, node: null, elapsedSeconds: 0, timeLimit: '00:01:00' });
    expect(parseScontrol('slurm_load_jobs error: Invalid job id specified')).toBeNull();
  });
  it('durations: [days-]hours:minutes:seconds and minutes:seconds', () => {
    expect(slurmSeconds('00:00:27')).toBe(27);
    expect(slurmSeconds('1-02:03:04')).toBe(86400 + 2 * 3600 + 3 * 60 + 4);
    expect(slurmSeconds('05:07')).toBe(307);
    expect(slurmSeconds('UNLIMITED')).toBeNull();
    expect(elapsedText(27)).toBe('0:27');
    expect(elapsedText(3723)).toBe('1:02:03');
    expect(elapsedText(null)).toBe('—');
  });
});

describe('a cluster job that ended', () => {
  const settings = { time: '01:00:00', mem: '4G' };
  const st = (state: string, extra: Partial<ReturnType<typeof parseScontrol>> = {}) => ({ ...parseScontrol(completed)!, state, ...extra });
  it('COMPLETED is no failure; the end states are terminal, the live ones are not (squeue(1) JOB STATE CODES)', () => {
    expect(clusterFailure('4', st('COMPLETED'), '', settings)).toBeNull();
    for (const s of ['COMPLETED', 'FAILED', 'TIMEOUT', 'OUT_OF_MEMORY', 'NODE_FAIL', 'CANCELLED']) expect(isTerminal(s)).toBe(true);
    for (const s of ['PENDING', 'RUNNING', 'COMPLETING', 'CONFIGURING', 'SUSPENDED']) expect(isTerminal(s)).toBe(false);
  });
  it('a time limit and lack of memory fail at once with what to change; a node failure is retried', () => {
    const t = clusterFailure('4', st('TIMEOUT', { timeLimit: '00:01:00' }), '', settings)!;
    expect(t).toBeInstanceOf(PermanentJobError);
    expect(t.message).toBe(
      'The cluster stopped job 4 on node vm at its time limit (00:01:00). Ask the facility admin for a longer limit (QUORUM_SLURM_TIME) or decompose with fewer components or restarts.',
    );
    const m = clusterFailure('4', st('OUT_OF_MEMORY'), '', settings)!;
    expect(m).toBeInstanceOf(PermanentJobError);
    expect(m.message).toMatch(/ran out of memory \(limit 4G\)/);
    expect(clusterFailure('4', st('NODE_FAIL'), '', settings)).toBeInstanceOf(JobError);
  });
  it('a non-zero exit names the code and the last lines of stderr, on one line', () => {
    const f = clusterFailure('4', st('FAILED', { exitCode: '1:0' }), 'quorum decompose: The run has 3 volumes', settings)!;
    expect(f.message).toBe(
      'Cluster job 4 on node vm ended with exit code 1. Last lines of its error output: quorum decompose: The run has 3 volumes',
    );
    expect(f.message).not.toContain('\n');
  });
  it("pending reasons in people's words", () => {
    expect(pendingReason('Resources')).toBe('waiting for free CPUs or memory');
    expect(pendingReason('None')).toBe('queued');
    expect(pendingReason('JobHeldAdmin')).toBe('Slurm reason: JobHeldAdmin');
  });
});

describe('the batch script', () => {
  const values = {
    job_name: 'quorum-j7-abc',
    partition: null,
    account: 'imaging',
    time: '00:30:00',
    cpus: '2',
    mem: '4G',
    stdout: '/shared/cluster/job-7/stdout.txt',
    stderr: '/shared/cluster/job-7/stderr.txt',
    workdir: '/shared/cluster/job-7',
    quorum_home: "'/opt/quorum app'",
    setup: 'module load nodejs/20',
    command: "npm run -s quorum -- decompose /shared/runs/a.nii.gz --out '/shared/x y'",
  };
  it('fills the placeholders and leaves out #SBATCH lines without a value', () => {
    const s = renderBatchScript(DEFAULT_TEMPLATE, values);
    expect(s).toContain('#SBATCH --job-name=quorum-j7-abc\n');
    expect(s).toContain('#SBATCH --account=imaging\n');
    expect(s).not.toContain('--partition');
    expect(s).toContain('#SBATCH --cpus-per-task=2\n#SBATCH --mem=4G\n');
    expect(s).toContain("module load nodejs/20\ncd '/opt/quorum app'\nnpm run -s quorum -- decompose");
  });
  it('refuses a placeholder it does not know, naming it', () => {
    expect(() => renderBatchScript('#SBATCH --qos={{qos}}', values)).toThrow(/\{\{qos\}\}/);
  });
  it('quotes words for the shell (POSIX single quotes)', () => {
    expect(shellQuote('/a/b.nii.gz')).toBe('/a/b.nii.gz');
    expect(shellQuote("it's here")).toBe(`'it'\\''s here'`);
    expect(shellQuote('$(rm -rf /)')).toBe("'$(rm -rf /)'");
  });
  it("passes the worker's engine options as `quorum decompose` flags", () => {
    expect(
      decomposeFlags({
        components: 'auto',
        dimMethod: { variance: 0.9 },
        seed: 1,
        restarts: 5,
        drop: 4,
        varianceNorm: false,
        detrend: true,
        contrast: 'logcosh',
        tol: 1e-4,
        maxIter: 200,
      }),
    ).toEqual([
      '--components',
      'auto',
      '--dim-method',
      'variance:0.9',
      '--seed',
      '1',
      '--restarts',
      '5',
      '--drop',
      '4',
      '--no-variance-norm',
      '--detrend',
      '--contrast',
      'logcosh',
      '--tol',
      '0.0001',
      '--max-iter',
      '200',
    ]);
  });
});

describe('progress through one FastICA run', () => {
  it('is 0 at the start (change 1) and near 1 at convergence (change = tol), log-scaled between', () => {
    expect(icaRunFraction(1, 1e-4)).toBe(0);
    expect(icaRunFraction(1e-2, 1e-4)).toBeCloseTo(0.5, 12);
    expect(icaRunFraction(1e-4, 1e-4)).toBe(0.99);
    expect(icaRunFraction(0, 1e-4)).toBe(0.99);
  });
});

describe("the denoise job's time courses for the node", () => {
  it('reads back as the very float32 values (ECMAScript Number::toString gives the shortest round-tripping digits)', () => {
    const k = 3;
    const tcs = Float32Array.from([0.1, -2.5e-8, 3.4028234663852886e38, 1 / 3, -0, 7, 1e-45, 123456.789, -0.3], (v) => v);
    const tsv = parseTsv(timecoursesTsv(tcs, k));
    expect(tsv.header).toEqual(['component_1', 'component_2', 'component_3']);
    expect(tsv.rows).toHaveLength(3);
    const back = Float64Array.from(tsv.rows.flat(), Number);
    // every value equals the float32 exactly (compared as doubles), so the fit sees the same numbers
    expect(Array.from(back)).toEqual(Array.from(tcs, (v) => v));
  });
});

describe('array settings', () => {
  const withEnv = (env: Record<string, string>, f: () => void) => {
    const old = { ...process.env };
    Object.assign(process.env, env);
    try {
      f();
    } finally {
      for (const key of Object.keys(env))
        if (old[key] === undefined) delete process.env[key];
        else process.env[key] = old[key];
    }
  };
  it('default to arrays of up to 50 runs gathered for one poll interval', () => {
    withEnv({ QUORUM_SLURM_POLL_MS: '700' }, () => expect(slurmSettings()).toMatchObject({ arrayMax: 50, arrayWaitMs: 700 }));
  });
  it('refuse a bad array size, naming the variable', () => {
    withEnv({ QUORUM_SLURM_ARRAY_MAX: '0' }, () => expect(() => slurmSettings()).toThrow(ExecutorSettingsError));
    withEnv({ QUORUM_SLURM_ARRAY_MAX: 'many' }, () =>
      expect(() => slurmSettings()).toThrow(/QUORUM_SLURM_ARRAY_MAX must be a whole number/),
    );
  });
});
