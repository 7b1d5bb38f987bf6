/**
 * Slurm's command-line clients (sbatch, squeue, scontrol, sacct, scancel, sinfo), called with
 * execFile (no shell) and a timeout; their output parsed into plain records. SLURM_CONF and PATH
 * come from the environment.
 */
import { execFile } from 'node:child_process';

export class SlurmCommandError extends Error {
  constructor(
    message: string,
    readonly stderr: string,
  ) {
    super(message);
    this.name = 'SlurmCommandError';
  }
}

function run(cmd: string, args: string[], timeoutMs = 30_000): Promise<string> {
  return new Promise((resolve, reject) => {
    execFile(cmd, args, { timeout: timeoutMs, maxBuffer: 4 * 1024 * 1024 }, (err, stdout, stderr) => {
      if (err) {
        const code = (err as NodeJS.ErrnoException).code;
        const why =
          code === 'ENOENT'
            ? `${cmd} is not installed on this worker's machine (or not on PATH)`
            : String(stderr).trim().split('\n')[0] || err.message;
        reject(new SlurmCommandError(`${cmd} failed: ${why}`, String(stderr)));
      } else resolve(String(stdout));
    });
  });
}

/** Submits a batch script; returns the cluster job id (sbatch --parsable prints "id[;cluster]"). */
export async function sbatch(scriptPath: string, extra: string[] = []): Promise<string> {
  const out = await run('sbatch', ['--parsable', ...extra, scriptPath]);
  const id = out.trim().split(';')[0] ?? '';
  if (!/^\d+(_\d+)?$/.test(id)) throw new SlurmCommandError(`sbatch answered "${out.trim()}", not a job id`, '');
  return id;
}

export async function scancel(jobId: string): Promise<void> {
  await run('scancel', [jobId]);
}

/**
 * The id of a job with this (unique) name that Slurm still knows, or null. A name
 * "<array name>#<task>" stands for one task of an array: its id is "<array id>_<task>".
 */
export async function findJobByName(name: string): Promise<string | null> {
  const task = /^(.+)#(\d+)$/.exec(name);
  const out = await run('squeue', ['-h', '-t', 'all', '--name', task ? task[1]! : name, '-o', task ? '%F' : '%i']);
  const id =
    out
      .trim()
      .split('\n')
      .map((l) => l.trim())
      .find(Boolean) ?? null;
  return id && task ? `${id}_${task[2]}` : id;
}

/** What Slurm says about one job. */
export interface ClusterJobState {
  /** PENDING, RUNNING, COMPLETING, COMPLETED, FAILED, TIMEOUT, OUT_OF_MEMORY, NODE_FAIL, CANCELLED, … */
  state: string;
  reason: string | null;
  node: string | null;
  /** Seconds since the job started (0 while pending). */
  elapsedSeconds: number | null;
  /** "exit:signal" when known (scontrol, sacct). */
  exitCode: string | null;
  timeLimit: string | null;
  /** Where stderr goes, when Slurm says. */
  stderrPath: string | null;
}

/** Slurm durations "[days-][hours:]minutes:seconds" → seconds (null when not a duration). */
export function slurmSeconds(text: string | null | undefined): number | null {
  if (!text) return null;
  const m = /^(?:(\d+)-)?(?:(\d+):)?(\d+):(\d+)$/.exec(text.trim());
  if (!m) return null;
  return Number(m[1] ?? 0) * 86400 + Number(m[2] ?? 0) * 3600 + Number(m[3]) * 60 + Number(m[4]);
}

const none = (v: string | undefined | null) => (!v || v === '(null)' || v === 'None' || v === 'N/A' ? null : v);

/** Parses one line of `scontrol show job -o` (Key=Value pairs separated by spaces). */
export function parseScontrol(line: string): ClusterJobState | null {
  const fields = new Map<string, string>();
  for (const m of line.matchAll(/(\w+(?::\w+)?)=(\S*)/g)) if (!fields.has(m[1]!)) fields.set(m[1]!, m[2]!);
  const state = fields.get('JobState');
  if (!state) return null;
  return {
    state,
    reason: none(fields.get('Reason')),
    node: none(fields.get('NodeList')) ?? none(fields.get('BatchHost')),
    elapsedSeconds: slurmSeconds(fields.get('RunTime')),
    exitCode: none(fields.get('ExitCode')),
    timeLimit: none(fields.get('TimeLimit')),
    stderrPath: none(fields.get('StdErr')),
  };
}

/**
 * The job's state: `scontrol show job` (live and recently ended jobs, with exit code), then
 * `sacct` (the accounting database, for jobs the controller has forgotten). null when neither
 * knows the job.
 */
export async function jobState(jobId: string): Promise<ClusterJobState | null> {
  try {
    const out = await run('scontrol', ['show', 'job', '-o', jobId]);
    const parsed = parseScontrol(out.trim().split('\n')[0] ?? '');
    if (parsed) return parsed;
  } catch (err) {
    if (!(err instanceof SlurmCommandError) || !/invalid job id/i.test(err.message)) throw err;
  }
  try {
    const out = await run('sacct', ['-n', '-P', '-X', '-j', jobId, '-o', 'State,Reason,NodeList,ElapsedRaw,ExitCode,Timelimit']);
    const line = out.trim().split('\n')[0];
    if (!line) return null;
    const [state, reason, node, elapsed, exitCode, timeLimit] = line.split('|');
    return {
      state: (state ?? '').split(' ')[0]!,
      reason: none(reason),
      node: none(node),
      elapsedSeconds: elapsed ? Number(elapsed) : null,
      exitCode: none(exitCode),
      timeLimit: none(timeLimit),
      stderrPath: null,
    };
  } catch {
    return null; // accounting off or the job unknown
  }
}

/** Does the cluster answer? sinfo's partitions and node states, or the error. */
export async function clusterAnswers(): Promise<
  { ok: true; partitions: { name: string; state: string; nodes: string }[] } | { ok: false; error: string }
> {
  try {
    const out = await run('sinfo', ['-h', '-o', '%P|%a|%D %T'], 10_000);
    const partitions = out
      .trim()
      .split('\n')
      .filter(Boolean)
      .map((l) => {
        const [name, state, nodes] = l.split('|');
        return { name: name ?? '', state: state ?? '', nodes: nodes ?? '' };
      });
    return { ok: true, partitions };
  } catch (err) {
    return { ok: false, error: err instanceof Error ? err.message : String(err) };
  }
}
