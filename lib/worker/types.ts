// What a job kind is and what it gets when it runs.
import type { Db, Trx } from '@/lib/db/transaction';
import type { z } from 'zod';
import type { Job } from '@/lib/jobs/queue';

export interface JobLogger {
  info(message: string): void;
  warn(message: string): void;
  error(message: string): void;
}

export interface JobContext<P> {
  db: Db;
  /** The payload, already validated by the kind's schema. */
  payload: P;
  job: Job;
  workerId: string;
  logger: JobLogger;
  /** Aborted when the job was cancelled or this worker lost its lease (or is shutting down). */
  signal: AbortSignal;
  /**
   * Records stage + percent (0..100) and extends the lease. Throws JobCancelled or LeaseLost when
   * the job is no longer this worker's to finish; the kind should let that error propagate.
   */
  progress(stage: string, percent: number, message?: string | null): Promise<void>;
  /**
   * For synchronous callbacks (e.g. the decomposition engine's onProgress): throws at once when
   * the job was already found stopped, else records the progress in the background.
   */
  progressSync(stage: string, percent: number, message?: string | null): void;
  /** Throws JobCancelled / LeaseLost when the job is no longer this worker's. */
  throwIfStopped(): void;
  /**
   * Runs `write` in one transaction that first locks the job row and checks this worker still
   * owns it, and then marks the job succeeded with `result`; so results are written exactly once
   * even when a lease expired and another worker took the job. Throws JobCancelled / LeaseLost.
   */
  commit<T>(write: (trx: Trx) => Promise<T>, result?: (value: T) => unknown): Promise<T>;
}

export interface JobKind<S extends z.ZodType = z.ZodType> {
  kind: string;
  payloadSchema: S;
  /** Does the work. Either returns a result (the worker completes the job) or calls ctx.commit. */
  run(ctx: JobContext<z.infer<S>>): Promise<unknown>;
}

/** Helper so a kind's ctx.payload is typed from its schema. */
export function defineJobKind<S extends z.ZodType>(kind: JobKind<S>): JobKind<S> {
  return kind;
}
