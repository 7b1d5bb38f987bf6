// Quorum worker: claims jobs from MariaDB and runs them (DESIGN.md §3).
// Usage: npm run worker [-- --once]
//   --once                 process jobs until none is queued or running, then exit (tests, batch)
// Environment: QUORUM_WORKER_ID (default host:pid:random), QUORUM_JOB_LEASE_MS (default 30000),
//   QUORUM_JOB_POLL_MS (500), QUORUM_JOB_RETRY_BASE_MS (5000), QUORUM_DECOMPOSE_THREADS,
//   QUORUM_WORKER_NICE (10: the worker's CPU priority, 0 = normal, up to 19 = lowest),
//   the database settings of lib/db/config.ts and QUORUM_UPLOADS_DIR (the shared storage root);
//   QUORUM_EXECUTOR (local | slurm), QUORUM_WORKER_CONCURRENCY and the QUORUM_SLURM_* settings
//   of lib/worker/executors/settings.ts.
// SIGTERM / SIGINT: the running job is released back to the queue (its attempt is not counted) and
// the worker exits; a second signal exits at once.
import { checkDatabase, closeDb, db } from '@/lib/db/knex';
import { jobKinds } from '@/lib/worker/kinds';
import { defaultWorkerId, startWorker } from '@/lib/worker/worker';
import { lowerProcessPriority } from '@/lib/worker/cpu-priority';
import { executorName, slurmSettings, workerConcurrency } from '@/lib/worker/executors/settings';
import { cancelOrphanedClusterJobs } from '@/lib/worker/executors/cancel-orphans';

function intEnv(name: string, fallback: number, min: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw.trim() === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < min) {
    process.stderr.write(`worker: ${name} must be a whole number ≥ ${min} (got "${raw}")\n`);
    process.exit(2);
  }
  return n;
}

async function main(): Promise<number> {
  const args = process.argv.slice(2);
  const unknown = args.filter((a) => a !== '--once');
  if (unknown.length) {
    process.stderr.write(`worker: unknown argument ${unknown.join(' ')}\nusage: npm run worker [-- --once]\n`);
    return 2;
  }
  const once = args.includes('--once');
  // Decompositions are batch work: run them at a lower CPU priority so that, on a machine shared with
  // the web app, votes and pages stay quick (every thread; threads the engine starts later inherit it).
  const nice = intEnv('QUORUM_WORKER_NICE', 10, 0);
  try {
    if (nice > 0) {
      const lowered = lowerProcessPriority(nice);
      process.stdout.write(
        `worker: CPU priority lowered to nice ${nice} (${lowered.threads} threads${lowered.sessionGroup ? ', and its session group' : ''})\n`,
      );
    }
  } catch (err) {
    process.stderr.write(`worker: could not lower its CPU priority (${(err as Error).message}); running at normal priority\n`);
  }
  const leaseMs = intEnv('QUORUM_JOB_LEASE_MS', 30_000, 200);
  const pollMs = intEnv('QUORUM_JOB_POLL_MS', 500, 10);
  const retryBaseMs = intEnv('QUORUM_JOB_RETRY_BASE_MS', 5_000, 0);
  const workerId = process.env.QUORUM_WORKER_ID?.trim() || defaultWorkerId();
  let executor: string;
  let concurrency: number;
  try {
    executor = executorName();
    concurrency = workerConcurrency();
    if (executor === 'slurm') {
      const s = slurmSettings();
      executor = `slurm (time ${s.time}, ${s.cpus} CPUs, ${s.mem}${s.partition ? `, partition ${s.partition}` : ''}; polls every ${s.pollMs} ms)`;
    }
  } catch (err) {
    process.stderr.write(`worker: ${(err as Error).message}\n`);
    return 2;
  }

  try {
    await checkDatabase(db);
  } catch (err) {
    process.stderr.write(`worker: ${(err as Error).message}\n`);
    await closeDb().catch(() => undefined);
    return 1;
  }

  console.log(
    `worker ${workerId}: ready (kinds ${Object.keys(jobKinds).join(', ')}; lease ${leaseMs} ms; executor ${executor}; ${concurrency} at once${once ? '; --once' : ''})`,
  );
  const worker = startWorker({
    db,
    kinds: jobKinds,
    workerId,
    leaseMs,
    pollMs,
    retryBaseMs,
    once,
    concurrency,
    onSweep:
      executorName() === 'slurm'
        ? async () => {
            const ids = await cancelOrphanedClusterJobs(db);
            return ids.length ? `cancelled cluster job ${ids.join(', ')} (their Quorum jobs were cancelled while queued)` : null;
          }
        : undefined,
  });

  let signals = 0;
  const onSignal = (sig: NodeJS.Signals) => {
    signals++;
    if (signals > 1) {
      process.stderr.write(`worker ${workerId}: ${sig} again, exiting now\n`);
      process.exit(130);
    }
    console.log(`worker ${workerId}: ${sig}, stopping`);
    void worker.stop().then(() => {
      // The job is back in the queue; give the kind a moment to notice, then leave regardless.
      setTimeout(() => process.exit(0), 5_000).unref();
    });
  };
  process.on('SIGTERM', onSignal);
  process.on('SIGINT', onSignal);

  const { processed } = await worker.done;
  console.log(`worker ${workerId}: stopped after ${processed} job${processed === 1 ? '' : 's'}`);
  await closeDb();
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    process.stderr.write(`worker: ${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  },
);
