/**
 * Runs one claimed job: validates its payload with the kind's schema, renews the lease on a timer
 * (every lease/3), gives the kind a context (progress, commit, signal, logger) and records the
 * outcome — succeeded, retried or failed with a readable message, or stopped quietly when the job
 * was cancelled or the lease lost.
 */
import { markJobSucceeded } from '@/lib/db/queries/jobs';
import { inTransaction, type Db } from '@/lib/db/transaction';
import { JobCancelled, LeaseLost, PermanentJobError, isStopSignal } from '@/lib/jobs/errors';
import { describePayloadIssues } from '@/lib/jobs/payloads';
import { clip, completeJob, failJob, getJob, lockOwnedJob, renewLease, reportProgress, type Job } from '@/lib/jobs/queue';
import type { JobContext, JobKind, JobLogger } from './types';

export type RunOutcome = 'succeeded' | 'retry' | 'failed' | 'cancelled' | 'lost';

export interface RunJobOptions {
  workerId: string;
  leaseMs: number;
  kinds: Readonly<Record<string, JobKind>>;
  logger: JobLogger;
  /** Base of the retry back-off (ms); attempt n waits base · 2^(n−1). Default 5000. */
  retryBaseMs?: number;
  /** Aborted by a stopping worker after it released the job: the kind stops at its next report. */
  stopSignal?: AbortSignal;
}

/** The first line of an error's message, for people (the full detail goes to `error`). */
export function readableMessage(err: unknown): string {
  const text = err instanceof Error ? err.message : String(err);
  const line = text.split('\n')[0]!.trim();
  return clip(line || (err instanceof Error ? err.name : 'The job failed for an unknown reason.'));
}

function detail(err: unknown): string {
  if (err instanceof Error) {
    let out = err.stack ?? `${err.name}: ${err.message}`;
    if (err.cause instanceof Error) out += `\ncaused by: ${err.cause.stack ?? err.cause.message}`;
    return out;
  }
  return String(err);
}

export async function runClaimedJob(db: Db, job: Job, opts: RunJobOptions): Promise<RunOutcome> {
  const { workerId, leaseMs, logger } = opts;
  const kind = opts.kinds[job.kind];
  if (!kind) {
    return failJob(db, job.id, workerId, { message: `This worker has no code for job kind "${job.kind}".`, permanent: true });
  }
  const parsed = kind.payloadSchema.safeParse(job.payload);
  if (!parsed.success) {
    return failJob(db, job.id, workerId, {
      message: `The job's payload is not valid for kind ${job.kind}: ${describePayloadIssues(parsed.error)}.`,
      error: job.payload === undefined || job.payload === null ? null : JSON.stringify(job.payload),
      permanent: true,
    });
  }

  const controller = new AbortController();
  let stopReason: JobCancelled | LeaseLost | null = null;
  const stoppedBy = (): JobCancelled | LeaseLost | null => stopReason;
  const stop = (reason: JobCancelled | LeaseLost) => {
    if (stopReason) return;
    stopReason = reason;
    controller.abort(reason);
  };
  /** After an update matched no row: was the job cancelled, or is the lease gone? */
  const diagnose = async () => {
    const now = await getJob(db, job.id);
    stop(now?.status === 'cancelled' ? new JobCancelled(job.id) : new LeaseLost(job.id, workerId));
  };
  const throwIfStopped = () => {
    if (stopReason) throw stopReason;
  };
  const onStop = () => stop(new LeaseLost(job.id, workerId));
  if (opts.stopSignal?.aborted) onStop();
  opts.stopSignal?.addEventListener('abort', onStop, { once: true });

  const renewEvery = Math.max(100, Math.floor(leaseMs / 3));
  let renewing = false;
  const timer = setInterval(() => {
    if (renewing || stopReason) return;
    renewing = true;
    renewLease(db, job.id, workerId, leaseMs)
      .then(async (ok) => {
        if (!ok) await diagnose();
      })
      .catch((err) => logger.warn(`job ${job.id}: lease renewal failed: ${readableMessage(err)}`))
      .finally(() => {
        renewing = false;
      });
  }, renewEvery);
  timer.unref?.();

  const report = async (stage: string, percent: number, message?: string | null) => {
    throwIfStopped();
    const ok = await reportProgress(db, job.id, workerId, { stage, percent, message, leaseMs });
    if (!ok) await diagnose();
    throwIfStopped();
  };
  let chain: Promise<void> = Promise.resolve();
  const progressSync = (stage: string, percent: number, message?: string | null) => {
    throwIfStopped();
    chain = chain.then(() => report(stage, percent, message)).catch(() => undefined);
  };
  // reports from synchronous callbacks still on their way are written first, so a later stage is
  // never overwritten by an earlier one
  const progress = async (stage: string, percent: number, message?: string | null) => {
    await chain;
    await report(stage, percent, message);
  };
  let committed = false;
  const commit: JobContext<unknown>['commit'] = async (write, result) => {
    throwIfStopped();
    const value = await inTransaction(async (trx) => {
      const state = await lockOwnedJob(trx, job.id, workerId);
      if (state === 'cancelled') throw new JobCancelled(job.id);
      if (state === 'lost') throw new LeaseLost(job.id, workerId);
      const v = await write(trx);
      await markJobSucceeded(trx, job.id, result ? result(v) : null);
      return v;
    }, db);
    committed = true;
    return value;
  };

  const ctx: JobContext<unknown> = {
    db,
    payload: parsed.data,
    job,
    workerId,
    logger,
    signal: controller.signal,
    progress,
    progressSync,
    throwIfStopped,
    commit,
  };

  try {
    const value = await kind.run(ctx);
    await chain;
    if (committed) return 'succeeded';
    throwIfStopped();
    if (await completeJob(db, job.id, workerId, value)) return 'succeeded';
    await diagnose();
    return stoppedBy() instanceof JobCancelled ? 'cancelled' : 'lost';
  } catch (err) {
    await chain;
    if (isStopSignal(err) || stoppedBy()) {
      const reason = isStopSignal(err) ? err : stoppedBy();
      return reason instanceof JobCancelled ? 'cancelled' : 'lost';
    }
    return failJob(db, job.id, workerId, {
      message: readableMessage(err),
      error: detail(err),
      permanent: err instanceof PermanentJobError,
      retryBaseMs: opts.retryBaseMs,
    });
  } finally {
    clearInterval(timer);
    opts.stopSignal?.removeEventListener('abort', onStop);
  }
}
