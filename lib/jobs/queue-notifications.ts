/**
 * Queues the notification jobs (framework-free: takes the connection or transaction to write with, so
 * the decompose job can call it inside its commit). A kind is queued only when no job of that
 * kind is already queued, so many assignments made within the batch window share one job.
 */
import { bringQueuedJobForward, findQueuedJobOfKind } from '@/lib/db/queries/jobs';
import type { Db } from '@/lib/db/transaction';
import { enqueueJob } from './queue';
import { notificationsEnabled, notifyBatchMs, overdueHourUtc, msUntilNextHourUtc } from '@/lib/notifications/config';
import { NOTIFY_ASSIGNMENTS, NOTIFY_OVERDUE, NOTIFY_VOTES_COMPLETE, type NotifyKind } from '@/lib/notifications/payloads';

/** Notification jobs run after the work they report on. */
const PRIORITY = -1;

/**
 * Queues a job of `kind` to start `delayMs` from now unless one is already queued. With
 * `sooner`, an already queued job due later is brought forward to now + delayMs.
 * Returns the job id, or null when notifications are switched off.
 */
export async function ensureNotifyJob(
  db: Db,
  {
    kind,
    delayMs,
    payload = {},
    studyId = null,
    sooner = false,
  }: { kind: NotifyKind; delayMs: number; payload?: Record<string, unknown>; studyId?: number | null; sooner?: boolean },
): Promise<{ jobId: number; existing: boolean } | null> {
  if (!notificationsEnabled()) return null;
  const queued = await findQueuedJobOfKind(db, { kind });
  if (queued !== null) {
    if (sooner) await bringQueuedJobForward(db, { id: queued, delayMs });
    return { jobId: queued, existing: true };
  }
  const id = await enqueueJob(db, { kind, payload: payload as never, priority: PRIORITY, studyId, delayMs: Math.max(0, delayMs) }); // payload checked by the kind's schema
  return { jobId: Number(id), existing: false };
}

/**
 * The hook after assignments are created (automatic assignment in the decompose job, or a lead
 * adding raters): one batched assignment e-mail per rater after QUORUM_NOTIFY_BATCH_MS, the
 * lead's "votes complete" check, and the daily overdue summary.
 */
export async function afterAssignmentsCreated(db: Db, { studyId = null }: { studyId?: number | null } = {}): Promise<void> {
  if (!notificationsEnabled()) return;
  await ensureNotifyJob(db, { kind: NOTIFY_ASSIGNMENTS, delayMs: notifyBatchMs(), studyId });
  await ensureNotifyJob(db, { kind: NOTIFY_VOTES_COMPLETE, delayMs: notifyBatchMs() });
  await ensureDailyOverdue(db);
}

/**
 * For a submission (rating desk): asks for the lead's "votes complete" check within the batch
 * window instead of at the next scan.
 */
export async function queueVotesCompleteCheck(db: Db): Promise<void> {
  await ensureNotifyJob(db, { kind: NOTIFY_VOTES_COMPLETE, delayMs: notifyBatchMs(), sooner: true });
}

/** Makes sure the daily overdue summary is queued (at the next QUORUM_OVERDUE_HOUR_UTC). */
export async function ensureDailyOverdue(db: Db): Promise<void> {
  await ensureNotifyJob(db, { kind: NOTIFY_OVERDUE, delayMs: msUntilNextHourUtc(overdueHourUtc()), payload: { repeat: true } });
}
