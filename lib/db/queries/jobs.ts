/**
 * The SQL of the job queue (table `jobs`, DESIGN.md §3): claiming, leases, progress, completion,
 * failure with back-off, cancelling, expired leases. lib/jobs/queue.ts is the queue's entry (it
 * checks payloads and inserts through insertJob, and re-exports the rest). Framework-free: every
 * function takes the Knex (or a transaction) to use, so the web app, the worker, the CLI and tests
 * share it. No `server-only`: the worker reads it too.
 *
 * Life of a job: queued → running (claimed by a worker, which holds a lease it renews) →
 * succeeded | failed | cancelled. A failed attempt goes back to queued with a back-off (run_after)
 * while attempts < max_attempts; a running job whose lease expired is re-queued the same way by
 * requeueExpiredLeases. All times are the database's clock (NOW(3)), so workers on machines with
 * skewed clocks agree.
 *
 * A job with run_id that ends failed (or cancelled) while its run is queued/processing also moves
 * the run to failed (cancelled), with the job's readable message as the run's status_message.
 */
import type { Knex } from 'knex';
import { parseJson, toJson } from '@/lib/db/knex';
import type { JobStatus } from '@/lib/db/job-status';

export interface Job {
  id: number;
  kind: string;
  payload: unknown;
  status: JobStatus;
  priority: number;
  attempts: number;
  maxAttempts: number;
  leaseOwner: string | null;
  leaseExpiresAt: Date | null;
  runAfter: Date;
  stage: string | null;
  percent: number | null;
  message: string | null;
  error: string | null;
  result: unknown;
  runId: number | null;
  studyId: number | null;
  createdBy: number | null;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
}

const COLUMNS = [
  'id',
  'kind',
  'payload',
  'status',
  'priority',
  'attempts',
  'max_attempts',
  'lease_owner',
  'lease_expires_at',
  'run_after',
  'stage',
  'percent',
  'message',
  'error',
  'result',
  'run_id',
  'study_id',
  'created_by',
  'created_at',
  'started_at',
  'finished_at',
] as const;

type JobRow = Record<(typeof COLUMNS)[number], unknown>;

function toJob(r: JobRow): Job {
  return {
    id: Number(r.id),
    kind: String(r.kind),
    payload: parseJson(r.payload),
    status: r.status as JobStatus,
    priority: Number(r.priority),
    attempts: Number(r.attempts),
    maxAttempts: Number(r.max_attempts),
    leaseOwner: (r.lease_owner as string | null) ?? null,
    leaseExpiresAt: (r.lease_expires_at as Date | null) ?? null,
    runAfter: r.run_after as Date,
    stage: (r.stage as string | null) ?? null,
    percent: r.percent === null || r.percent === undefined ? null : Number(r.percent),
    message: (r.message as string | null) ?? null,
    error: (r.error as string | null) ?? null,
    result: parseJson(r.result),
    runId: r.run_id === null || r.run_id === undefined ? null : Number(r.run_id),
    studyId: r.study_id === null || r.study_id === undefined ? null : Number(r.study_id),
    createdBy: r.created_by === null || r.created_by === undefined ? null : Number(r.created_by),
    createdAt: r.created_at as Date,
    startedAt: (r.started_at as Date | null) ?? null,
    finishedAt: (r.finished_at as Date | null) ?? null,
  };
}

/** The `message` column holds at most 1000 characters. */
export function clip(text: string, max = 1000): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`;
}

const leaseExpr = (db: Knex, leaseMs: number) =>
  db.raw('DATE_ADD(NOW(3), INTERVAL ? MICROSECOND)', [Math.max(1, Math.round(leaseMs)) * 1000]);

/** The row of a new queued job (payload already checked by the queue); returns its id. */
export async function insertJob(
  db: Knex,
  row: {
    kind: string;
    payload: unknown;
    priority: number;
    maxAttempts: number;
    runId: number | null;
    studyId: number | null;
    createdBy: number | null;
    delayMs?: number;
  },
): Promise<number> {
  const [id] = await db('jobs').insert({
    kind: row.kind,
    payload: toJson(row.payload),
    status: 'queued',
    priority: row.priority,
    max_attempts: row.maxAttempts,
    run_id: row.runId,
    study_id: row.studyId,
    created_by: row.createdBy,
    run_after: row.delayMs ? db.raw('DATE_ADD(NOW(3), INTERVAL ? MICROSECOND)', [Math.round(row.delayMs) * 1000]) : db.raw('NOW(3)'),
  });
  return Number(id);
}

/** One job by id (null when there is none). */
export async function getJob(db: Knex, id: number): Promise<Job | null> {
  const row = await db('jobs').select(COLUMNS).where({ id }).first();
  return row ? toJob(row as JobRow) : null;
}

/** What a page shows about a job: status, stage, percent and the readable message. */
export interface JobProgress {
  id: number;
  kind: string;
  status: JobStatus;
  stage: string | null;
  percent: number | null;
  message: string | null;
  attempts: number;
  maxAttempts: number;
  updatedAt: Date;
}

/** The latest job of a kind for a run (for a runs table or a progress poll), or null. */
export async function latestJobForRun(db: Knex, { runId, kind }: { runId: number; kind?: string }): Promise<JobProgress | null> {
  const q = db('jobs')
    .select('id', 'kind', 'status', 'stage', 'percent', 'message', 'attempts', 'max_attempts', 'updated_at')
    .where({ run_id: runId })
    .orderBy('id', 'desc')
    .first();
  if (kind) q.andWhere({ kind });
  const r = await q;
  if (!r) return null;
  return {
    id: Number(r.id),
    kind: r.kind,
    status: r.status,
    stage: r.stage ?? null,
    percent: r.percent === null ? null : Number(r.percent),
    message: r.message ?? null,
    attempts: Number(r.attempts),
    maxAttempts: Number(r.max_attempts),
    updatedAt: r.updated_at,
  };
}

/**
 * Claims the next due job (highest priority, then oldest) with SELECT … FOR UPDATE SKIP LOCKED, so
 * concurrent workers never take the same row, and marks it running under this worker's lease.
 * `kinds` limits the kinds this worker can run. Returns null when nothing is due.
 */
export async function claimJob(
  db: Knex,
  { workerId, kinds, leaseMs }: { workerId: string; kinds?: readonly string[]; leaseMs: number },
): Promise<Job | null> {
  if (kinds && kinds.length === 0) return null;
  return db.transaction(async (trx) => {
    const kindSql = kinds ? ` AND kind IN (${kinds.map(() => '?').join(', ')})` : '';
    const [rows] = (await trx.raw(
      `SELECT id FROM jobs WHERE status = 'queued' AND run_after <= NOW(3)${kindSql} ` +
        'ORDER BY priority DESC, id LIMIT 1 FOR UPDATE SKIP LOCKED',
      kinds ? [...kinds] : [],
    )) as [Array<{ id: number }>];
    const id = rows[0]?.id;
    if (id === undefined) return null;
    await trx('jobs')
      .where({ id })
      .update({
        status: 'running',
        attempts: trx.raw('attempts + 1'),
        lease_owner: workerId,
        lease_expires_at: leaseExpr(trx, leaseMs),
        started_at: trx.raw('NOW(3)'),
        stage: 'starting',
        percent: 0,
        // the queue's words ("Waiting for a worker", "Retrying in 5 s") no longer hold once claimed
        message: null,
        finished_at: null,
      });
    const row = await trx('jobs').select(COLUMNS).where({ id }).first();
    return toJob(row as JobRow);
  });
}

/** Extends this worker's lease; false when the job is no longer running under this worker. */
export async function renewLease(db: Knex, id: number, workerId: string, leaseMs: number): Promise<boolean> {
  const n = await db('jobs')
    .where({ id, lease_owner: workerId, status: 'running' })
    .update({ lease_expires_at: leaseExpr(db, leaseMs) });
  return n === 1;
}

/**
 * Records stage and percent (0..100) and, when leaseMs is given, extends the lease. Only while the
 * caller still owns the running job: false means the lease was lost or the job was cancelled, and
 * the worker should stop.
 */
export async function reportProgress(
  db: Knex,
  id: number,
  workerId: string,
  p: { stage: string; percent: number; message?: string | null; leaseMs?: number },
): Promise<boolean> {
  const percent = Math.max(0, Math.min(100, Number.isFinite(p.percent) ? p.percent : 0));
  const update: Record<string, unknown> = { stage: clip(p.stage, 64), percent };
  if (p.message !== undefined) update.message = p.message === null ? null : clip(p.message);
  if (p.leaseMs) update.lease_expires_at = leaseExpr(db, p.leaseMs);
  const n = await db('jobs').where({ id, lease_owner: workerId, status: 'running' }).update(update);
  return n === 1;
}

/**
 * Locks the job row inside a transaction and tells whether the caller still owns it
 * ('owned' | 'cancelled' | 'lost'). Used by completeJob and by kinds that write their results
 * and complete the job in one transaction.
 */
export async function lockOwnedJob(trx: Knex.Transaction, id: number, workerId: string): Promise<'owned' | 'cancelled' | 'lost'> {
  const row = await trx('jobs').select('status', 'lease_owner').where({ id }).forUpdate().first();
  if (!row) return 'lost';
  if (row.status === 'cancelled') return 'cancelled';
  if (row.status !== 'running' || row.lease_owner !== workerId) return 'lost';
  return 'owned';
}

/** The columns of a job that ended successfully with `result` (JSON; null when none). */
function succeededColumns(db: Knex, result: unknown) {
  return {
    status: 'succeeded',
    stage: 'done',
    percent: 100,
    message: null,
    error: null,
    result: toJson(result ?? null),
    lease_owner: null,
    lease_expires_at: null,
    finished_at: db.raw('NOW(3)'),
  };
}

/** Marks an owned running job succeeded (with an optional JSON result); false if not owned. */
export async function completeJob(db: Knex, id: number, workerId: string, result?: unknown): Promise<boolean> {
  const n = await db('jobs').where({ id, lease_owner: workerId, status: 'running' }).update(succeededColumns(db, result));
  return n === 1;
}

/** Back-off before retry number `attempt` (1-based): base · 2^(attempt−1), at most 10 minutes. */
export function retryDelayMs(attempt: number, baseMs: number): number {
  return Math.min(600_000, Math.max(0, baseMs) * 2 ** Math.max(0, attempt - 1));
}

/** Sets a job's run to failed/cancelled when the job ends that way while the run is in the queue. */
async function settleRun(trx: Knex.Transaction, runId: number | null, status: 'failed' | 'cancelled', message: string): Promise<void> {
  if (runId === null) return;
  await trx('runs')
    .where({ id: runId })
    .whereIn('status', ['queued', 'processing'])
    .update({ status, status_message: clip(message) });
}

export type FailOutcome = 'retry' | 'failed' | 'lost';

/**
 * Records a failed attempt of an owned job. While attempts < max_attempts (and not `permanent`)
 * the job goes back to queued with run_after = now + back-off and a message saying so; otherwise
 * it ends failed with `message` (readable) and `error` (detail, e.g. a stack). Returns what
 * happened; 'lost' when the caller no longer owned the job (nothing changed).
 */
export async function failJob(
  db: Knex,
  id: number,
  workerId: string,
  f: { message: string; error?: string | null; permanent?: boolean; retryBaseMs?: number },
): Promise<FailOutcome> {
  return db.transaction(async (trx) => {
    const row = await trx('jobs').select('status', 'lease_owner', 'attempts', 'max_attempts', 'run_id').where({ id }).forUpdate().first();
    if (!row || row.status !== 'running' || row.lease_owner !== workerId) return 'lost';
    const attempts = Number(row.attempts);
    const max = Number(row.max_attempts);
    const error = f.error ? f.error.slice(0, 60_000) : null;
    if (!f.permanent && attempts < max) {
      const delay = retryDelayMs(attempts, f.retryBaseMs ?? 5_000);
      await trx('jobs')
        .where({ id })
        .update({
          status: 'queued',
          lease_owner: null,
          lease_expires_at: null,
          run_after: trx.raw('DATE_ADD(NOW(3), INTERVAL ? MICROSECOND)', [delay * 1000]),
          stage: 'waiting to retry',
          message: clip(`Attempt ${attempts} of ${max} failed: ${f.message} Retrying in ${Math.ceil(delay / 1000)} s.`),
          error,
        });
      return 'retry';
    }
    const message = clip(f.message);
    await trx('jobs')
      .where({ id })
      .update({
        status: 'failed',
        lease_owner: null,
        lease_expires_at: null,
        stage: 'failed',
        message,
        error,
        finished_at: trx.raw('NOW(3)'),
      });
    await settleRun(trx, row.run_id === null ? null : Number(row.run_id), 'failed', message);
    return 'failed';
  });
}

/**
 * Gives an owned running job back to the queue without counting the attempt (a worker that is
 * shutting down). Its run goes back from processing to queued. false when not owned.
 */
export async function releaseJob(db: Knex, id: number, workerId: string): Promise<boolean> {
  return db.transaction(async (trx) => {
    const row = await trx('jobs').select('status', 'lease_owner', 'run_id').where({ id }).forUpdate().first();
    if (!row || row.status !== 'running' || row.lease_owner !== workerId) return false;
    await trx('jobs')
      .where({ id })
      .update({
        status: 'queued',
        attempts: trx.raw('GREATEST(attempts - 1, 0)'),
        lease_owner: null,
        lease_expires_at: null,
        run_after: trx.raw('NOW(3)'),
        stage: 'queued',
        percent: null,
        message: 'Released by a worker that was stopping; it will run again.',
      });
    if (row.run_id !== null) {
      await trx('runs').where({ id: row.run_id, status: 'processing' }).update({ status: 'queued', status_message: null });
    }
    return true;
  });
}

export type CancelOutcome = 'cancelled' | 'cancelling' | 'finished' | 'not_found';

/**
 * Cancels a job: a queued job is cancelled at once and never runs ('cancelled'); a running job is
 * marked cancelled and its worker stops at its next progress report or lease renewal, writing
 * nothing ('cancelling'); a finished job is left alone ('finished'). The job's run, if queued or
 * processing, becomes cancelled.
 */
export async function cancelJob(db: Knex, id: number, opts: { message?: string } = {}): Promise<CancelOutcome> {
  return db.transaction(async (trx) => {
    const row = await trx('jobs').select('status', 'run_id').where({ id }).forUpdate().first();
    if (!row) return 'not_found';
    if (row.status !== 'queued' && row.status !== 'running') return 'finished';
    const message = opts.message ?? 'Cancelled.';
    await trx('jobs')
      .where({ id })
      .update({ status: 'cancelled', stage: 'cancelled', message: clip(message), finished_at: trx.raw('NOW(3)') });
    await settleRun(trx, row.run_id === null ? null : Number(row.run_id), 'cancelled', message);
    return row.status === 'queued' ? 'cancelled' : 'cancelling';
  });
}

/**
 * Running jobs whose lease has expired (their worker died or hung) go back to queued, or end
 * failed — "the worker stopped responding (lease expired) after N attempts" — when they have no
 * attempts left. Safe to run from every worker at once (rows are locked with SKIP LOCKED).
 * Returns the ids handled.
 */
export async function requeueExpiredLeases(db: Knex): Promise<{ requeued: number[]; failed: number[] }> {
  return db.transaction(async (trx) => {
    const [rows] = (await trx.raw(
      "SELECT id, attempts, max_attempts, run_id, lease_owner FROM jobs WHERE status = 'running' AND lease_expires_at < NOW(3) " +
        'ORDER BY id LIMIT 100 FOR UPDATE SKIP LOCKED',
    )) as [Array<{ id: number; attempts: number; max_attempts: number; run_id: number | null; lease_owner: string | null }>];
    const requeued: number[] = [];
    const failed: number[] = [];
    for (const r of rows) {
      const attempts = Number(r.attempts);
      if (attempts < Number(r.max_attempts)) {
        await trx('jobs')
          .where({ id: r.id })
          .update({
            status: 'queued',
            lease_owner: null,
            lease_expires_at: null,
            run_after: trx.raw('NOW(3)'),
            stage: 'queued',
            message: clip(
              `Attempt ${attempts} stopped: worker ${r.lease_owner ?? '?'} stopped responding (lease expired); it will run again.`,
            ),
          });
        if (r.run_id !== null) {
          await trx('runs').where({ id: r.run_id, status: 'processing' }).update({ status: 'queued' });
        }
        requeued.push(Number(r.id));
      } else {
        const message = `The worker stopped responding (lease expired) after ${attempts} attempt${attempts === 1 ? '' : 's'}.`;
        await trx('jobs')
          .where({ id: r.id })
          .update({
            status: 'failed',
            lease_owner: null,
            lease_expires_at: null,
            stage: 'failed',
            message,
            error: `lease of ${r.lease_owner ?? '?'} expired`,
            finished_at: trx.raw('NOW(3)'),
          });
        await settleRun(trx, r.run_id === null ? null : Number(r.run_id), 'failed', message);
        failed.push(Number(r.id));
      }
    }
    return { requeued, failed };
  });
}

/** The oldest queued job of the kind (null: none queued). */
export async function findQueuedJobOfKind(db: Knex, { kind, studyId }: { kind: string; studyId?: number }): Promise<number | null> {
  const query = db('jobs').where({ kind, status: 'queued' });
  if (studyId !== undefined) query.andWhere({ study_id: studyId });
  const queued = await query.orderBy('id').first('id');
  return queued ? Number(queued.id) : null;
}

/** A queued job due later than now + delayMs is brought forward to then (run_after never moves later). */
export async function bringQueuedJobForward(db: Knex, { id, delayMs }: { id: number; delayMs: number }): Promise<void> {
  await db('jobs')
    .where({ id, status: 'queued' })
    .update({ run_after: db.raw('LEAST(run_after, DATE_ADD(NOW(3), INTERVAL ? MICROSECOND))', [Math.max(0, delayMs) * 1000]) });
}

/** How many jobs of the kinds are queued or running. */
export async function countOpenJobsOfKinds(db: Knex, { kinds }: { kinds: readonly string[] }): Promise<number> {
  const row = await db('jobs').whereIn('status', ['queued', 'running']).whereIn('kind', kinds).count({ n: '*' }).first();
  return Number(row?.n ?? 0);
}

/** A job just queued says so: stage queued, 0 %, "Waiting for a worker". */
export async function markJobWaiting(db: Knex, id: number): Promise<void> {
  await db('jobs').where({ id }).update({ stage: 'queued', percent: 0, message: 'Waiting for a worker' });
}

/**
 * Marks the job succeeded inside the transaction that locked it as owned (lockOwnedJob) and wrote
 * its results, so the results and the completion commit together.
 */
export async function markJobSucceeded(trx: Knex.Transaction, id: number, result: unknown): Promise<void> {
  await trx('jobs').where({ id }).update(succeededColumns(trx, result));
}
