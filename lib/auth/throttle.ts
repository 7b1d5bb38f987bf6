import 'server-only';
import { createHash } from 'node:crypto';
import { db } from '@/lib/db/knex';

/**
 * Throttles for sign-in, invitation and reset endpoints, one row per key in sign_in_throttles.
 * A policy says how many failures inside the window are free and how the wait grows after that:
 * the n-th failure beyond the free ones waits min(cap, base · 2^(n-1)) seconds (exponential
 * back-off: common practice, no source). Sign-in never locks an account as such: it throttles the
 * (account, address) pair and the address (lib/auth/options.ts), so an attacker elsewhere cannot
 * keep the owner out.
 */
export type ThrottlePolicy = { free: number; baseSec: number; capSec: number; windowSec: number };

/** Failures allowed per key inside the window before the default policy locks it (15 min). */
export const MAX_FAILURES = 5;
/** Invitation and reset endpoints: five tries, then 15 minutes. */
export const DEFAULT_POLICY: ThrottlePolicy = { free: MAX_FAILURES - 1, baseSec: 900, capSec: 900, windowSec: 900 };
/** One account from one address: three free tries, then 1 s, 2 s, 4 s … up to 15 min. */
export const PAIR_POLICY: ThrottlePolicy = { free: 3, baseSec: 1, capSec: 900, windowSec: 3600 };
/** One address over all accounts (a shared NAT is many people): ten free, then 1 s … 15 min. */
export const ADDRESS_POLICY: ThrottlePolicy = { free: 10, baseSec: 1, capSec: 900, windowSec: 3600 };
/** One account when the address is unknown (no proxy, no peer address): slows, never locks out (≤ 30 s). */
export const ACCOUNT_POLICY: ThrottlePolicy = { free: 5, baseSec: 1, capSec: 30, windowSec: 3600 };

export type ThrottleKey = `ip:${string}` | `account:${string}` | `pair:${string}` | `invite:${string}` | `reset:${string}`;

/** Keys are stored as given when short; long ones (a 254-character e-mail…) as prefix + sha256. */
function stored(key: ThrottleKey): string {
  if (key.length <= 120) return key;
  const prefix = key.slice(0, key.indexOf(':') + 1);
  return `${prefix}sha256:${createHash('sha256').update(key).digest('hex')}`;
}

/** The throttle key of one account signing in from one address. */
export function pairKey(email: string, address: string): ThrottleKey {
  return `pair:${createHash('sha256').update(`${email}\n${address}`).digest('hex')}`;
}

/** Milliseconds until the key may try again (0 = not locked). */
export async function lockedFor(key: ThrottleKey): Promise<number> {
  const row = await db('sign_in_throttles')
    .select('locked_until')
    .where({ key: stored(key) })
    .first();
  const until = row?.locked_until ? new Date(row.locked_until).getTime() : 0;
  return Math.max(0, until - Date.now());
}

/**
 * Counts one failure for the key and sets its wait by the policy. One atomic upsert (no
 * read-then-write), so concurrent failures neither lose counts nor deadlock. In MariaDB's
 * ON DUPLICATE KEY UPDATE the assignments run left to right and see earlier ones.
 */
export async function recordFailure(key: ThrottleKey, policy: ThrottlePolicy = DEFAULT_POLICY): Promise<void> {
  const { free, baseSec, capSec, windowSec } = policy;
  const wait = `LEAST(?, ? * POW(2, LEAST(failures - ? - 1, 30)))`;
  await db.raw(
    `INSERT INTO sign_in_throttles (\`key\`, failures, window_start, locked_until)
       VALUES (?, 1, NOW(3), IF(1 > ?, NOW(3) + INTERVAL ? SECOND, NULL))
     ON DUPLICATE KEY UPDATE
       failures = IF(window_start < NOW(3) - INTERVAL ? SECOND, 1, failures + 1),
       locked_until = IF(failures > ?, NOW(3) + INTERVAL ${wait} SECOND, locked_until),
       window_start = IF(failures = 1, NOW(3), window_start)`,
    [stored(key), free, baseSec, windowSec, free, capSec, baseSec, free],
  );
}

/** Counts one attempt against each key (invitation and reset endpoints count every attempt). */
export async function countAttempts(keys: readonly ThrottleKey[]): Promise<void> {
  for (const key of keys) await recordFailure(key);
}

export async function clearFailures(key: ThrottleKey): Promise<void> {
  await db('sign_in_throttles')
    .where({ key: stored(key) })
    .delete();
}

/** "8 seconds", "3 minutes": how long to wait, for people. */
export function waitText(ms: number): string {
  const s = Math.ceil(ms / 1000);
  if (s < 60) return `${s} second${s === 1 ? '' : 's'}`;
  const m = Math.ceil(s / 60);
  return `${m} minute${m === 1 ? '' : 's'}`;
}
