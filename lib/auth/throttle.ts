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

/**
 * Counts one failure for the key; locks it once MAX_FAILURES fall inside the window. One atomic
 * upsert (no read-then-write), so concurrent failures neither lose counts nor deadlock. In
 * MariaDB's ON DUPLICATE KEY UPDATE the assignments run left to right and see earlier ones.
 */
export async function recordFailure(key: ThrottleKey): Promise<void> {
  const windowSec = WINDOW_MS / 1000;
  const lockSec = LOCK_MS / 1000;
  await db.raw(
    `INSERT INTO sign_in_throttles (\`key\`, failures, window_start, locked_until) VALUES (?, 1, NOW(3), NULL)
     ON DUPLICATE KEY UPDATE
       failures = IF(window_start < NOW(3) - INTERVAL ? SECOND, 1, failures + 1),
       locked_until = IF(failures >= ?, NOW(3) + INTERVAL ? SECOND, locked_until),
       window_start = IF(failures = 1, NOW(3), window_start)`,
    [key, windowSec, MAX_FAILURES, lockSec],
  );
}

/** Counts one attempt against each key (invitation and reset endpoints count every attempt). */
export async function countAttempts(keys: readonly ThrottleKey[]): Promise<void> {
  for (const key of keys) await recordFailure(key);
}

export async function clearFailures(key: ThrottleKey): Promise<void> {
  await db('sign_in_throttles').where({ key }).delete();
}
