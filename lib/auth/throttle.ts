import 'server-only';
import { db } from '@/lib/db/knex';

/** Failed sign-ins allowed per key inside the window before the key is locked. */
export const MAX_FAILURES = 5;
const WINDOW_MS = 15 * 60 * 1000;
const LOCK_MS = 15 * 60 * 1000;

export type ThrottleKey = `ip:${string}` | `account:${string}` | `invite:${string}` | `reset:${string}`;

/** Milliseconds until the key may try again (0 = not locked). */
export async function lockedFor(key: ThrottleKey): Promise<number> {
  const row = await db('sign_in_throttles').select('locked_until').where({ key }).first();
  const until = row?.locked_until ? new Date(row.locked_until).getTime() : 0;
  return Math.max(0, until - Date.now());
}

/** Counts one failure for the key; locks it once MAX_FAILURES fall inside the window. */
export async function recordFailure(key: ThrottleKey): Promise<void> {
  const now = new Date();
  await db.transaction(async (trx) => {
    const row = await trx('sign_in_throttles').where({ key }).forUpdate().first();
    const windowStart = row?.window_start ? new Date(row.window_start) : null;
    const fresh = !windowStart || now.getTime() - windowStart.getTime() > WINDOW_MS;
    const failures = fresh ? 1 : Number(row.failures) + 1;
    const lockedUntil = failures >= MAX_FAILURES ? new Date(now.getTime() + LOCK_MS) : null;
    const values = { failures, window_start: fresh ? now : windowStart, locked_until: lockedUntil };
    if (row) await trx('sign_in_throttles').where({ key }).update(values);
    else await trx('sign_in_throttles').insert({ key, ...values });
  });
}

export async function clearFailures(key: ThrottleKey): Promise<void> {
  await db('sign_in_throttles').where({ key }).delete();
}
