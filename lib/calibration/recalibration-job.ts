/**
 * Queues the daily re-calibration check (job kind `recalibrate`) unless one is already queued. It
 * runs at QUORUM_OVERDUE_HOUR_UTC (the hour of the daily overdue summary, default 07:00 UTC).
 * Framework-free: takes the connection or transaction to write with.
 */
import { findQueuedJobOfKind } from '@/lib/db/queries/jobs';
import type { Db } from '@/lib/db/transaction';
import { enqueueJob } from '@/lib/jobs/queue';
import { msUntilNextHourUtc, overdueHourUtc } from '@/lib/notifications/config';
import { RECALIBRATE } from '@/lib/jobs/recalibrate-payload';

export async function ensureRecalibrationJob(db: Db, { delayMs }: { delayMs?: number } = {}): Promise<number> {
  const queued = await findQueuedJobOfKind(db, { kind: RECALIBRATE });
  if (queued !== null) return queued;
  return enqueueJob(db, {
    kind: RECALIBRATE,
    payload: { repeat: true },
    priority: -1,
    delayMs: delayMs ?? msUntilNextHourUtc(overdueHourUtc()),
  });
}
