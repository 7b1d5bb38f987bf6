/**
 * The worker loop (scripts/worker.ts is its command line): claim a due job, run it under a
 * renewed lease, repeat; poll when idle; re-queue expired leases of dead workers now and then.
 * Stateless — any number of workers on any machines share one database and one storage root.
 */
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import { countOpenJobsOfKinds } from '@/lib/db/queries/jobs';
import type { Db } from '@/lib/db/transaction';
import { claimJob, releaseJob, requeueExpiredLeases, type Job } from '@/lib/jobs/queue';
import { readableMessage, runClaimedJob, type RunOutcome } from './runner';
import type { JobKind, JobLogger } from './types';

export interface WorkerOptions {
  db: Db;
  kinds: Readonly<Record<string, JobKind>>;
  workerId?: string;
  /** Lease length (ms); renewed every lease/3. Default 30 000. */
  leaseMs?: number;
  /** Idle poll interval (ms). Default 500. */
  pollMs?: number;
  /** How often to re-queue expired leases (ms). Default: the lease length. */
  sweepMs?: number;
  retryBaseMs?: number;
  /** Exit when no job of these kinds is queued or running any more (tests, batch). */
  once?: boolean;
  logger?: JobLogger;
  /** Called for every job start and end (one line each). */
  onLine?: (line: string) => void;
  /**
   * Jobs this worker runs at once (default 1). More than one pays off when jobs mostly wait —
   * on a cluster (the Slurm executor) — not when they compute here.
   */
  concurrency?: number;
  /** Extra housekeeping on every sweep (the Slurm executor cancels orphaned cluster jobs). */
  onSweep?: () => Promise<string | null>;
}

export function defaultWorkerId(): string {
  return `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
}

const consoleLogger: JobLogger = {
  info: (m) => console.log(m),
  warn: (m) => console.warn(m),
  error: (m) => console.error(m),
};

export interface WorkerHandle {
  workerId: string;
  /** Resolves when the loop has ended. */
  done: Promise<{ processed: number }>;
  /**
   * Stops the loop: a running job is released back to the queue (its attempt not counted) and
   * the kind is told to stop. Resolves when released; the loop ends when the kind returns.
   */
  stop(): Promise<void>;
  current(): Job | null;
  /** Every job this worker is running now. */
  running(): Job[];
}

function sleep(ms: number, signal: AbortSignal): Promise<void> {
  return new Promise((resolve) => {
    if (signal.aborted) return resolve();
    const t = setTimeout(done, ms);
    function done() {
      clearTimeout(t);
      signal.removeEventListener('abort', done);
      resolve();
    }
    signal.addEventListener('abort', done, { once: true });
  });
}

/** Starts the loop and returns a handle (the loop runs until stop() or, with once, an empty queue). */
export function startWorker(opts: WorkerOptions): WorkerHandle {
  const db = opts.db;
  const workerId = opts.workerId ?? defaultWorkerId();
  const leaseMs = opts.leaseMs ?? 30_000;
  const pollMs = opts.pollMs ?? 500;
  const sweepMs = opts.sweepMs ?? leaseMs;
  const logger = opts.logger ?? consoleLogger;
  const line = opts.onLine ?? ((l: string) => logger.info(l));
  const kindNames = Object.keys(opts.kinds);
  const concurrency = Math.max(1, Math.floor(opts.concurrency ?? 1));
  const stopping = new AbortController();
  /** The jobs under way, each with the signal that tells its kind to stop, and its promise. */
  const active = new Map<number, { job: Job; stop: AbortController; done: Promise<void> }>();

  const sweep = async () => {
    try {
      const { requeued, failed } = await requeueExpiredLeases(db);
      if (requeued.length) line(`worker ${workerId}: re-queued job ${requeued.join(', ')} (lease expired)`);
      if (failed.length) line(`worker ${workerId}: job ${failed.join(', ')} failed (lease expired, no attempts left)`);
      const extra = await opts.onSweep?.();
      if (extra) line(`worker ${workerId}: ${extra}`);
    } catch (err) {
      logger.warn(`worker ${workerId}: lease sweep failed: ${readableMessage(err)}`);
    }
  };

  const pending = (): Promise<number> => countOpenJobsOfKinds(db, { kinds: kindNames });

  const words: Record<RunOutcome | 'error', string> = {
    succeeded: 'succeeded',
    retry: 'failed; queued for retry',
    failed: 'failed (no attempts left)',
    cancelled: 'stopped (cancelled)',
    lost: 'stopped (lease lost or released)',
    error: 'ended with an unrecorded outcome',
  };
  let processed = 0;
  /** The claim on its way, if any: stop() waits for it, so a job claimed just then is given back before the worker exits. */
  let claiming: Promise<Job | null> | null = null;
  /** Something to wake the loop when a job ends (so a full worker claims again at once). */
  let wake: () => void = () => undefined;

  const execute = async (job: Job, stop: AbortController) => {
    const t0 = Date.now();
    line(
      `job ${job.id} ${job.kind} started (attempt ${job.attempts}/${job.maxAttempts}${job.runId ? `, run ${job.runId}` : ''}) by ${workerId}`,
    );
    let outcome: RunOutcome | 'error';
    try {
      outcome = await runClaimedJob(db, job, {
        workerId,
        leaseMs,
        kinds: opts.kinds,
        logger,
        retryBaseMs: opts.retryBaseMs,
        stopSignal: stop.signal,
      });
    } catch (err) {
      // the database went away while recording the outcome: the lease will expire and another
      // worker (or this one) takes the job again
      logger.error(`job ${job.id}: could not record the outcome: ${readableMessage(err)}`);
      outcome = 'error';
    }
    const secs = ((Date.now() - t0) / 1000).toFixed(1);
    line(`job ${job.id} ${job.kind} ${words[outcome]} after ${secs} s`);
    processed++;
  };

  const waitForRoomOrPoll = (ms: number) =>
    new Promise<void>((resolve) => {
      const t = setTimeout(finish, ms);
      function finish() {
        clearTimeout(t);
        stopping.signal.removeEventListener('abort', finish);
        wake = () => undefined;
        resolve();
      }
      wake = finish;
      stopping.signal.addEventListener('abort', finish, { once: true });
      if (stopping.signal.aborted) finish();
    });

  const loop = async () => {
    let lastSweep = 0;
    while (!stopping.signal.aborted) {
      if (Date.now() - lastSweep >= sweepMs) {
        lastSweep = Date.now();
        await sweep();
      }
      if (active.size >= concurrency) {
        await waitForRoomOrPoll(sweepMs);
        continue;
      }
      let job: Job | null = null;
      try {
        claiming = claimJob(db, { workerId, kinds: kindNames, leaseMs });
        job = await claiming;
      } catch (err) {
        logger.error(`worker ${workerId}: cannot claim a job: ${readableMessage(err)}`);
        await sleep(Math.max(pollMs, 2_000), stopping.signal);
        continue;
      }
      if (!job) {
        if (opts.once && active.size === 0 && (await pending()) === 0) break;
        await waitForRoomOrPoll(pollMs);
        continue;
      }
      if (stopping.signal.aborted) {
        // the stop came while the claim was on its way back: give the job back untouched
        if (await releaseJob(db, job.id, workerId).catch(() => false)) line(`job ${job.id} ${job.kind} released back to the queue`);
        break;
      }
      const stop = new AbortController();
      const claimed = job;
      const done = execute(claimed, stop).finally(() => {
        active.delete(claimed.id);
        wake();
      });
      active.set(claimed.id, { job: claimed, stop, done });
    }
    await Promise.all([...active.values()].map((a) => a.done));
    return { processed };
  };

  const done = loop();
  return {
    workerId,
    done,
    current: () => active.values().next().value?.job ?? null,
    running: () => [...active.values()].map((a) => a.job),
    async stop() {
      stopping.abort();
      await claiming?.catch(() => null);
      // the loop gives back a job claimed during the stop; wait until it has
      if (active.size === 0) await Promise.race([done, new Promise((r) => setTimeout(r, 2_000))]);
      for (const { job, stop } of [...active.values()]) {
        try {
          if (await releaseJob(db, job.id, workerId)) line(`job ${job.id} ${job.kind} released back to the queue`);
        } catch (err) {
          logger.error(`job ${job.id}: could not release: ${readableMessage(err)}`);
        }
        stop.abort();
      }
    },
  };
}
