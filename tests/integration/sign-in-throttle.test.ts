/**
 * Sign-in throttling against the real MariaDB: failures are counted atomically (concurrent
 * first failures on fresh keys neither deadlock nor lose counts), a key locks at MAX_FAILURES,
 * clearing unlocks, and forwarding headers are believed only behind a trusted proxy.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { db, closeDb } from '@/lib/db/knex';
import { clearFailures, lockedFor, MAX_FAILURES, recordFailure } from '@/lib/auth/throttle';
import { addressKey, clientAddress } from '@/lib/auth/client-address';
import { uniqueSuffix } from './helpers/factories';

afterAll(closeDb);

describe('throttle', () => {
  it('counts concurrent failures on fresh keys exactly, without deadlocks', async () => {
    const keys = [`ip:test-${uniqueSuffix()}`, `account:${uniqueSuffix()}@t.invalid`] as const;
    await Promise.all(Array.from({ length: 8 }, (_, i) => recordFailure(keys[i % 2])));
    const rows = await db('sign_in_throttles').whereIn('key', keys).select('key', 'failures');
    expect(rows.map((r) => Number(r.failures))).toEqual([4, 4]);
  });

  it('locks a key at the limit and unlocks it when cleared', async () => {
    const key = `account:${uniqueSuffix()}@t.invalid` as const;
    for (let i = 1; i < MAX_FAILURES; i++) await recordFailure(key);
    expect(await lockedFor(key)).toBe(0);
    await recordFailure(key);
    const wait = await lockedFor(key);
    expect(wait).toBeGreaterThan(14 * 60 * 1000);
    expect(wait).toBeLessThanOrEqual(15 * 60 * 1000);
    await clearFailures(key);
    expect(await lockedFor(key)).toBe(0);
  });

  it('starts a new window once the old one has passed', async () => {
    const key = `ip:test-${uniqueSuffix()}` as const;
    await recordFailure(key);
    await recordFailure(key);
    await db('sign_in_throttles').where({ key }).update({ window_start: db.raw('NOW(3) - INTERVAL 20 MINUTE') });
    await recordFailure(key);
    expect(Number((await db('sign_in_throttles').where({ key }).first('failures')).failures)).toBe(1);
  });
});

describe('clientAddress', () => {
  const req = new Request('http://localhost/', { headers: { 'x-forwarded-for': '203.0.113.9, 10.0.0.1' } });
  it('ignores forwarding headers unless the proxy is trusted', () => {
    delete process.env.QUORUM_TRUST_PROXY;
    expect(clientAddress(req)).toBe('direct');
    // no shared key for unknown callers: one person must not lock everyone out
    expect(addressKey('ip', req)).toBeNull();
    process.env.QUORUM_TRUST_PROXY = '1';
    expect(clientAddress(req)).toBe('203.0.113.9');
    expect(addressKey('reset:ip', req)).toBe('reset:ip:203.0.113.9');
    delete process.env.QUORUM_TRUST_PROXY;
  });
});
