/**
 * Which address a request comes from (lib/auth/client-address.ts): forwarding headers only behind
 * a trusted proxy, the production server's peer header only in that server's process, and never
 * raw header text (an over-long or odd X-Forwarded-For is no address). Issue 13 items 6 and 10.
 */
import { afterEach, describe, expect, it } from 'vitest';
import { auditAddress, clientAddress } from '@/lib/auth/client-address';

const saved = { trust: process.env.QUORUM_TRUST_PROXY, peer: process.env.QUORUM_PEER_HEADER };
afterEach(() => {
  for (const [name, value] of [
    ['QUORUM_TRUST_PROXY', saved.trust],
    ['QUORUM_PEER_HEADER', saved.peer],
  ] as const) {
    if (value === undefined) delete process.env[name];
    else process.env[name] = value;
  }
});
const req = (headers: Record<string, string>) => new Request('http://localhost/', { headers });

describe('clientAddress', () => {
  it("believes the server's peer header only when the production server set QUORUM_PEER_HEADER", () => {
    delete process.env.QUORUM_TRUST_PROXY;
    delete process.env.QUORUM_PEER_HEADER;
    expect(clientAddress(req({ 'x-quorum-peer': '192.0.2.7' }))).toBe('direct');
    process.env.QUORUM_PEER_HEADER = '1';
    expect(clientAddress(req({ 'x-quorum-peer': '192.0.2.7', 'x-forwarded-for': '10.0.0.1' }))).toBe('192.0.2.7');
    expect(clientAddress(req({ 'x-quorum-peer': '::ffff:192.0.2.8' }))).toBe('192.0.2.8');
  });

  it('takes no over-long or odd X-Forwarded-For as an address', () => {
    process.env.QUORUM_TRUST_PROXY = '1';
    delete process.env.QUORUM_PEER_HEADER;
    expect(clientAddress(req({ 'x-forwarded-for': '9'.repeat(100_000) }))).toBe('direct');
    expect(clientAddress(req({ 'x-forwarded-for': `${'1'.repeat(70)}, 10.0.0.1` }))).toBe('direct');
    expect(clientAddress(req({ 'x-forwarded-for': "203.0.113.9'; DROP TABLE users; --" }))).toBe('direct');
    expect(auditAddress(req({ 'x-forwarded-for': `203.0.113.9, ${'10.0.0.1, '.repeat(5000)}` }))).toBe('203.0.113.9');
    expect(clientAddress(req({ 'x-forwarded-for': '2001:db8::1' }))).toBe('2001:db8::1');
  });
});
