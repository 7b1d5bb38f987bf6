import 'server-only';
import { createHash } from 'node:crypto';
import { deleteThrottle, readLockedUntil, upsertFailure } from '@/lib/db/queries/sign-in-throttles';

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
  const until = (await readLockedUntil(stored(key)))?.getTime() ?? 0;
  return Math.max(0, until - Date.now());
}

/** Counts one failure for the key and sets its wait by the policy (one atomic upsert, see upsertFailure). */
export async function recordFailure(key: ThrottleKey, policy: ThrottlePolicy = DEFAULT_POLICY): Promise<void> {
  await upsertFailure(stored(key), policy);
}

/** Counts one attempt against each key (invitation and reset endpoints count every attempt). */
export async function countAttempts(keys: readonly ThrottleKey[]): Promise<void> {
  for (const key of keys) await recordFailure(key);
}

export async function clearFailures(key: ThrottleKey): Promise<void> {
  await deleteThrottle(stored(key));
}

/** "8 seconds", "3 minutes": how long to wait, for people. */
export function waitText(ms: number): string {
  const s = Math.ceil(ms / 1000);
  if (s < 60) return `${s} second${s === 1 ? '' : 's'}`;
  const m = Math.ceil(s / 60);
  return `${m} minute${m === 1 ? '' : 's'}`;
}
