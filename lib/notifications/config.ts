/**
 * Notification settings from the environment (no framework imports: the web app, the worker and
 * tests share them).
 *
 * - QUORUM_NOTIFY_BATCH_MS: how long new assignments are collected before each rater gets one
 *   e-mail listing them (default 60000). Under NODE_ENV=test notifications are queued only when
 *   this is set, so test files that do not look at mail never find notification jobs in the queue
 *   (a worker started with --once waits for every queued job, even a delayed one).
 * - QUORUM_NOTIFY_SCAN_MS: how often the lead's "votes complete" check runs while ratings are
 *   open (default 300000); a submission can also ask for it sooner (queueVotesCompleteCheck).
 * - QUORUM_OVERDUE_HOUR_UTC: the hour (0–23, UTC) of the daily overdue summary (default 7).
 * - QUORUM_NOTIFY=off: queue no notifications at all.
 */
type Env = Record<string, string | undefined>;

function ms(value: string | undefined, fallback: number, name: string): number {
  if (value === undefined || value.trim() === '') return fallback;
  const n = Number(value);
  if (!Number.isFinite(n) || n < 0) throw new Error(`${name} must be a number of milliseconds ≥ 0 (got "${value}")`);
  return Math.round(n);
}

export function notificationsEnabled(env: Env = process.env): boolean {
  if (env.QUORUM_NOTIFY?.trim().toLowerCase() === 'off') return false;
  if (env.NODE_ENV === 'test' && (env.QUORUM_NOTIFY_BATCH_MS ?? '').trim() === '') return false;
  return true;
}

export function notifyBatchMs(env: Env = process.env): number {
  return ms(env.QUORUM_NOTIFY_BATCH_MS, 60_000, 'QUORUM_NOTIFY_BATCH_MS');
}

export function votesCompleteScanMs(env: Env = process.env): number {
  return ms(env.QUORUM_NOTIFY_SCAN_MS, 300_000, 'QUORUM_NOTIFY_SCAN_MS');
}

export function overdueHourUtc(env: Env = process.env): number {
  const raw = env.QUORUM_OVERDUE_HOUR_UTC;
  if (raw === undefined || raw.trim() === '') return 7;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 23) throw new Error(`QUORUM_OVERDUE_HOUR_UTC must be a whole hour 0–23 (got "${raw}")`);
  return n;
}

/** Milliseconds from `now` to the next `hour`:00 UTC (tomorrow's when today's has passed). */
export function msUntilNextHourUtc(hour: number, now: Date = new Date()): number {
  const next = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate(), hour, 0, 0, 0));
  if (next.getTime() <= now.getTime()) next.setUTCDate(next.getUTCDate() + 1);
  return next.getTime() - now.getTime();
}
