/**
 * Queues the daily re-calibration check (job kind `recalibrate`) unless one is already queued. It
 * runs at QUORUM_OVERDUE_HOUR_UTC (the hour of the daily overdue summary, default 07:00 UTC).
 * Framework-free: takes the Knex or transaction to write with.
 */
import type { Knex } from 'knex';
import { enqueueJob } from '@/lib/jobs/queue';
import { msUntilNextHourUtc, overdueHourUtc } from '@/lib/notifications/config';
import { RECALIBRATE } from '@/lib/jobs/recalibrate-payload';

export async function ensureRecalibrationJob(db: Knex, { delayMs }: { delayMs?: number } = {}): Promise<number> {
  const queued = await db('jobs').where({ kind: RECALIBRATE, status: 'queued' }).orderBy('id').first('id');
  if (queued) return Number(queued.id);
  return enqueueJob(db, {
    kind: RECALIBRATE,
    payload: { repeat: true },
    priority: -1,
    delayMs: delayMs ?? msUntilNextHourUtc(overdueHourUtc()),
  });
}
