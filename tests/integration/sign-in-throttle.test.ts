/**
 * Sign-in throttling against the real MariaDB: failures are counted atomically (concurrent
 * first failures on fresh keys neither deadlock nor lose counts), a key locks at MAX_FAILURES,
 * clearing unlocks, and forwarding headers are believed only behind a trusted proxy. Through the
 * real sign-in (authorize): waits grow per (account, address) and per address, the owner is never
 * locked out by someone elsewhere, and internal errors reach nobody but the log (issue 13 items 6, 7).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

vi.mock('server-only', () => ({}));
import { db, closeDb } from '@/lib/db/knex';
import { clearFailures, lockedFor, MAX_FAILURES, pairKey, recordFailure } from '@/lib/auth/throttle';
import { hashPassword } from '@/lib/auth/password';
import { signInSchema } from '@/lib/auth/schemas';
import { addressKey, clientAddress } from '@/lib/auth/client-address';
import { uniqueSuffix } from './helpers/factories';

afterAll(() => closeDb());

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
    await db('sign_in_throttles')
      .where({ key })
      .update({ window_start: db.raw('NOW(3) - INTERVAL 20 MINUTE') });
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

describe('sign-in throttles (issue 13 items 6 and 7)', () => {
  type Authorize = (c: Record<string, string>, req: { headers: Record<string, string> }) => Promise<{ id: string } | null>;
  let authorize: Authorize;
  let SIGN_IN_UNAVAILABLE: string;
  const env = { trust: process.env.QUORUM_TRUST_PROXY, peer: process.env.QUORUM_PEER_HEADER };

  beforeAll(async () => {
    const options = await import('@/lib/auth/options');
    SIGN_IN_UNAVAILABLE = options.SIGN_IN_UNAVAILABLE;
    const provider = options.authOptions.providers[0] as unknown as { options: { authorize: Authorize } };
    authorize = provider.options.authorize;
    delete process.env.QUORUM_TRUST_PROXY;
    process.env.QUORUM_PEER_HEADER = '1'; // as scripts/serve.ts runs: the peer address, no proxy
  });
  afterAll(() => {
    if (env.trust === undefined) delete process.env.QUORUM_TRUST_PROXY;
    else process.env.QUORUM_TRUST_PROXY = env.trust;
    if (env.peer === undefined) delete process.env.QUORUM_PEER_HEADER;
    else process.env.QUORUM_PEER_HEADER = env.peer;
  });

  async function account(password: string): Promise<string> {
    const email = `owner-${uniqueSuffix()}@t.invalid`;
    await db('users').insert({ email, name: 'Throttle owner', role: 'admin', active: true, password_hash: await hashPassword(password) });
    return email;
  }
  const from = (address: string, extra: Record<string, string> = {}) => ({ headers: { 'x-quorum-peer': address, ...extra } });
  const attempt = (email: string, password: string, req: { headers: Record<string, string> }) =>
    authorize({ email, password }, req).then(
      (user) => ({ ok: true as const, user, message: '' }),
      (err: Error) => ({ ok: false as const, user: null, message: err.message }),
    );
  /** The wait the last failure set on the key, in ms (0 = none): locked_until minus the row's update time. */
  const delaySet = async (key: string) => {
    const row = await db('sign_in_throttles')
      .where({ key })
      .first(db.raw('TIMESTAMPDIFF(MICROSECOND, updated_at, locked_until) DIV 1000 AS ms'));
    return Math.max(0, Number(row?.ms ?? 0));
  };
  /** Lets every wait pass without waiting: the throttle rows' locks are moved into the past. */
  const waitOut = () =>
    db('sign_in_throttles')
      .whereNotNull('locked_until')
      .update({ locked_until: db.raw('NOW(3) - INTERVAL 1 SECOND') });

  it('an attacker elsewhere meets growing waits but cannot lock the owner out', async () => {
    const email = await account('owners-password-1');
    const attacker = from(`203.0.113.${Math.floor(Math.random() * 200) + 20}`);
    const waits: number[] = [];
    for (let i = 0; i < 12; i++) {
      const res = await attempt(email, `guess-${i}`, attacker);
      expect(res.message).toBe('E-mail or password is wrong.');
      waits.push(await delaySet(pairKey(email, attacker.headers['x-quorum-peer'])));
      if (waits[i] > 0)
        expect((await attempt(email, `guess-${i}-again`, attacker)).message).toMatch(
          /^Too many failed sign-ins\. Try again in \d+ (seconds?|minutes?)\.$/,
        );
      await waitOut();
    }
    // three free tries, then the wait doubles: 1 s, 2 s, 4 s … 256 s
    expect(waits).toEqual([0, 0, 0, 1000, 2000, 4000, 8000, 16_000, 32_000, 64_000, 128_000, 256_000]);
    // the owner, at home, signs in with the right password at once
    const owner = await attempt(email, 'owners-password-1', from('198.51.100.7'));
    expect(owner.ok, owner.message).toBe(true);
  });

  it('limits one address over many accounts without a proxy, whatever X-Forwarded-For says', async () => {
    const address = `192.0.2.${Math.floor(Math.random() * 200) + 20}`;
    for (let i = 0; i < 11; i++) {
      const res = await attempt(
        `nobody-${i}-${uniqueSuffix()}@t.invalid`,
        'wrong-password',
        from(address, { 'x-forwarded-for': `10.9.8.${i}` }),
      );
      expect(res.message).toBe('E-mail or password is wrong.');
    }
    const next = await attempt(`someone-${uniqueSuffix()}@t.invalid`, 'wrong-password', from(address, { 'x-forwarded-for': '10.0.0.99' }));
    expect(next.message).toMatch(/^Too many failed sign-ins/);
    await waitOut();
  });

  it('without any known address, slows an account down but never for more than 30 s', async () => {
    delete process.env.QUORUM_PEER_HEADER;
    try {
      const email = await account('owners-password-2');
      for (let i = 0; i < 15; i++) {
        await attempt(email, `guess-${i}`, { headers: {} });
        await waitOut();
      }
      await attempt(email, 'guess-last', { headers: {} });
      expect(await delaySet(`account:${email}`)).toBe(30_000); // 2^10 s, capped at 30 s
    } finally {
      process.env.QUORUM_PEER_HEADER = '1';
    }
  });

  it('a database error inside sign-in becomes one generic message, logged in full', async () => {
    const email = await account('owners-password-3');
    const logged = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    await db.raw('RENAME TABLE sign_in_throttles TO sign_in_throttles_away');
    try {
      const res = await attempt(email, 'owners-password-3', from('198.51.100.8'));
      expect(res.message).toBe(SIGN_IN_UNAVAILABLE);
      expect(res.message).not.toMatch(/select|sign_in_throttles|ER_|127\.0\.0\.1/i);
      expect(String(logged.mock.calls[0]?.[1])).toMatch(/sign_in_throttles/);
    } finally {
      await db.raw('RENAME TABLE sign_in_throttles_away TO sign_in_throttles');
      logged.mockRestore();
    }
  });

  it('a 262-character e-mail is refused as a wrong sign-in, never reaching SQL', async () => {
    const long = `${'a'.repeat(64)}@${'b'.repeat(63)}.${'c'.repeat(63)}.${'d'.repeat(61)}.example`;
    expect(long.length).toBe(262);
    const res = await attempt(long, 'whatever-password', from('198.51.100.9'));
    expect(res.message).toBe('E-mail or password is wrong.');
    const parsed = signInSchema.safeParse({ email: long, password: 'x' });
    expect(parsed.success).toBe(false);
    expect(JSON.stringify(parsed.error?.issues)).toMatch(/at most 254 characters/);
  });
});
