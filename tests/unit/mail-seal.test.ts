// lib/mail/seal.ts: AES-256-GCM (NIST SP 800-38D) round trip, and a tampered or foreign-key
// message is refused rather than read. The readable copy loses its one-time links.
import { describe, expect, it } from 'vitest';
import { openMail, sealMail, withoutSecrets } from '@/lib/mail/seal';

const secret = 'a-test-secret-that-is-long-enough-0123456789';
const content = {
  subject: 'Reset',
  text: 'Open http://x/reset-password/tok123 within an hour',
  html: '<a href="http://x/reset-password/tok123">reset</a>',
};

describe('sealed outbox messages', () => {
  it('open with the same secret, and each seal is different (fresh IV)', () => {
    const a = sealMail(content, secret);
    const b = sealMail(content, secret);
    expect(a).not.toBe(b);
    expect(a).not.toContain('tok123');
    expect(openMail(a, secret)).toEqual(content);
  });

  it('do not open with another secret or after tampering', () => {
    const sealed = sealMail(content, secret);
    expect(openMail(sealed, `${secret}x`)).toBeNull();
    const parts = sealed.split('.');
    const body = Buffer.from(parts[3], 'base64url');
    body[0] ^= 1;
    expect(openMail([parts[0], parts[1], parts[2], body.toString('base64url')].join('.'), secret)).toBeNull();
    expect(openMail('v2.x.y.z', secret)).toBeNull();
    expect(openMail('garbage', secret)).toBeNull();
  });

  it('readable copies keep no one-time link', () => {
    const r = withoutSecrets(content, ['http://x/reset-password/tok123', 'tok123']);
    expect(JSON.stringify(r)).not.toContain('tok123');
    expect(r.text).toBe('Open [one-time link, not kept] within an hour');
  });
});
