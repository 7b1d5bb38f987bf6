/**
 * The job queue in MariaDB (table `jobs`, DESIGN.md §3): its entry for the web app, the worker, the
 * CLI and tests. enqueueJob checks the payload against the kind's schema and inserts the row; the
 * SQL of the queue's life (claim, lease, progress, complete, fail with back-off, cancel, expired
 * leases) is in lib/db/queries/jobs.ts, re-exported here. Every function takes the connection (a
 * `Db` or `Trx` from lib/db/transaction.ts) to use.
 */
import type { Db } from '@/lib/db/transaction';
import { insertJob } from '@/lib/db/queries/jobs';
import { describePayloadIssues, isJobKind, jobPayloadSchemas, type JobKindName, type JobPayload } from './payloads';

export {
  cancelJob,
  claimJob,
  clip,
  completeJob,
  failJob,
  getJob,
  latestJobForRun,
  lockOwnedJob,
  releaseJob,
  renewLease,
  reportProgress,
  requeueExpiredLeases,
  type Job,
} from '@/lib/db/queries/jobs';

/** Raised by enqueueJob for an unknown kind or a payload its schema refuses. */
export class JobPayloadError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'JobPayloadError';
  }
}

export interface EnqueueOptions<K extends JobKindName> {
  kind: K;
  payload: JobPayload<K>;
  runId?: number | null;
  studyId?: number | null;
  createdBy?: number | null;
  /** Default 3. */
  maxAttempts?: number;
  /** Higher runs first; default 0. */
  priority?: number;
  /** Do not start before this many milliseconds from now (default 0). */
  delayMs?: number;
}

/** Adds a queued job and returns its id. The payload is checked against the kind's schema. */
export async function enqueueJob<K extends JobKindName>(db: Db, opts: EnqueueOptions<K>): Promise<number> {
  if (!isJobKind(opts.kind)) throw new JobPayloadError(`Unknown job kind "${String(opts.kind)}".`);
  const parsed = jobPayloadSchemas[opts.kind].safeParse(opts.payload);
  if (!parsed.success) {
    throw new JobPayloadError(`The payload of a ${opts.kind} job is not valid: ${describePayloadIssues(parsed.error)}.`);
  }
  const maxAttempts = opts.maxAttempts ?? 3;
  if (!Number.isInteger(maxAttempts) || maxAttempts < 1)
    throw new JobPayloadError(`maxAttempts must be a whole number ≥ 1; got ${maxAttempts}.`);
  return insertJob(db, {
    kind: opts.kind,
    payload: parsed.data,
    priority: opts.priority ?? 0,
    maxAttempts,
    runId: opts.runId ?? null,
    studyId: opts.studyId ?? null,
    createdBy: opts.createdBy ?? null,
    delayMs: opts.delayMs,
  });
}
