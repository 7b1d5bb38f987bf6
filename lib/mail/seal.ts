/**
 * Encryption of a queued e-mail while it waits in mail_outbox for the send-mail job: AES-256-GCM
 * (NIST SP 800-38D) with a key derived from the server secret by HKDF-SHA256 (RFC 5869), a fresh
 * 96-bit IV per message. Sealed text is "v1.<iv>.<tag>.<ciphertext>" in base64url. Anyone with the
 * database alone cannot read a one-time link out of the outbox.
 */
import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from 'node:crypto';
import { authSecret } from '@/lib/auth/secret';
import type { MailContent } from './templates/layout';

function key(secret: string): Buffer {
  return Buffer.from(hkdfSync('sha256', secret, 'quorum', 'mail-outbox v1', 32));
}

export function sealMail(content: MailContent, secret = authSecret()): string {
  const iv = randomBytes(12);
  const cipher = createCipheriv('aes-256-gcm', key(secret), iv);
  const body = Buffer.concat([cipher.update(JSON.stringify(content), 'utf8'), cipher.final()]);
  return ['v1', iv.toString('base64url'), cipher.getAuthTag().toString('base64url'), body.toString('base64url')].join('.');
}

/** The sealed message, or null when it cannot be opened (another secret, or tampered). */
export function openMail(sealed: string, secret = authSecret()): MailContent | null {
  const [version, iv, tag, body] = sealed.split('.');
  if (version !== 'v1' || !iv || !tag || body === undefined) return null;
  try {
    const decipher = createDecipheriv('aes-256-gcm', key(secret), Buffer.from(iv, 'base64url'));
    decipher.setAuthTag(Buffer.from(tag, 'base64url'));
    const text = Buffer.concat([decipher.update(Buffer.from(body, 'base64url')), decipher.final()]).toString('utf8');
    return JSON.parse(text) as MailContent;
  } catch {
    return null;
  }
}

/** The message with each secret (a one-time link) replaced by a note, for the readable outbox copy. */
export function withoutSecrets(content: MailContent, secrets: readonly string[]): MailContent {
  const strip = (s: string) => secrets.reduce((out, secret) => out.split(secret).join('[one-time link, not kept]'), s);
  return { subject: strip(content.subject), text: strip(content.text), html: strip(content.html) };
}
