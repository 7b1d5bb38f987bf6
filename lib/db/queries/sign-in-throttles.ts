// Rows of sign_in_throttles, one per stored key (lib/auth/throttle.ts decides the keys and policies).
import 'server-only';
import { db } from '@/lib/db/knex';

/** When the key may try again (null: not locked, or no row). */
export async function readLockedUntil(key: string): Promise<Date | null> {
  const row = await db('sign_in_throttles').select('locked_until').where({ key }).first();
  return row?.locked_until ? new Date(row.locked_until) : null;
}

/**
 * Counts one failure for the key and sets its wait: past `free` failures inside `windowSec`, the
 * n-th failure beyond them waits min(capSec, baseSec · 2^(n-1)) seconds. One atomic upsert (no
 * read-then-write), so concurrent failures neither lose counts nor deadlock. In MariaDB's
 * ON DUPLICATE KEY UPDATE the assignments run left to right and see earlier ones.
 */
export async function upsertFailure(
  key: string,
  { free, baseSec, capSec, windowSec }: { free: number; baseSec: number; capSec: number; windowSec: number },
): Promise<void> {
  const wait = `LEAST(?, ? * POW(2, LEAST(failures - ? - 1, 30)))`;
  await db.raw(
    `INSERT INTO sign_in_throttles (\`key\`, failures, window_start, locked_until)
       VALUES (?, 1, NOW(3), IF(1 > ?, NOW(3) + INTERVAL ? SECOND, NULL))
     ON DUPLICATE KEY UPDATE
       failures = IF(window_start < NOW(3) - INTERVAL ? SECOND, 1, failures + 1),
       locked_until = IF(failures > ?, NOW(3) + INTERVAL ${wait} SECOND, locked_until),
       window_start = IF(failures = 1, NOW(3), window_start)`,
    [key, free, baseSec, windowSec, free, capSec, baseSec, free],
  );
}

export async function deleteThrottle(key: string): Promise<void> {
  await db('sign_in_throttles').where({ key }).delete();
}
