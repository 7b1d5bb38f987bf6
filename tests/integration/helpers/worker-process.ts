/**
 * Spawns `node --conditions=react-server --import tsx scripts/worker.ts` as a child process against the test database
 * (QUORUM_DB_NAME from the harness) and a given storage root, collecting its output lines.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');

export interface WorkerProcess {
  child: ChildProcess;
  workerId: string;
  /** stdout + stderr lines so far. */
  lines: string[];
  /** Resolves with the exit code (null when killed by a signal) and the signal. */
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

export function spawnWorker(opts: { uploadsDir: string; args?: string[]; workerId?: string; env?: Record<string, string> }): WorkerProcess {
  const workerId = opts.workerId ?? `test-worker-${Math.random().toString(16).slice(2, 8)}`;
  const child = spawn(
    process.execPath,
    ['--conditions=react-server', '--import', 'tsx', 'scripts/worker.ts', ...(opts.args ?? ['--once'])],
    {
      cwd: root,
      env: {
        ...process.env,
        NODE_ENV: 'test',
        QUORUM_DB_NAME: process.env.QUORUM_DB_NAME ?? 'quorum_test',
        QUORUM_UPLOADS_DIR: opts.uploadsDir,
        QUORUM_WORKER_ID: workerId,
        QUORUM_JOB_POLL_MS: '100',
        QUORUM_DECOMPOSE_THREADS: '1',
        ...opts.env,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  const lines: string[] = [];
  const collect = (buf: Buffer) => {
    for (const l of buf.toString('utf8').split('\n')) if (l.trim()) lines.push(l);
  };
  child.stdout!.on('data', collect);
  child.stderr!.on('data', collect);
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => {
    child.on('exit', (code, signal) => resolve({ code, signal }));
  });
  return { child, workerId, lines, exited };
}

/** Polls `check` every `everyMs` until it returns a truthy value or `timeoutMs` passes. */
export async function waitFor<T>(
  check: () => Promise<T | null | undefined | false>,
  { timeoutMs = 20_000, everyMs = 20 } = {},
): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v) return v;
    if (Date.now() > end) throw new Error(`condition not met within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}
