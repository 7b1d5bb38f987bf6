/**
 * One-time links (invitations and password resets): a random 32-byte token travels in the e-mail,
 * only its SHA-256 is stored (invitations.token_hash). A link is valid until it expires, is used
 * once, or is withdrawn.
 */
import { createHash, randomBytes } from 'node:crypto';

/** Invitations expire after QUORUM_INVITE_DAYS days (default 7). */
export function inviteTtlMs(env: Record<string, string | undefined> = process.env): number {
  const days = Number(env.QUORUM_INVITE_DAYS ?? 7);
  return (Number.isFinite(days) && days > 0 ? days : 7) * 24 * 60 * 60 * 1000;
}
/** Password-reset links expire after one hour. */
export const RESET_TTL_MS = 60 * 60 * 1000;

/** A new token (base64url, 43 characters) and the hash to store. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

/** SHA-256 of the token as 64 hex digits. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

/** A token as it may appear in a link: base64url, 43 characters. */
export function looksLikeToken(token: string): boolean {
  return /^[A-Za-z0-9_-]{43}$/.test(token);
}

export type LinkState = 'valid' | 'used' | 'expired' | 'revoked' | 'unknown';

export type LinkRow = { expiresAt: Date; usedAt: Date | null; revokedAt: Date | null };

/** The state of a stored link at `now`: used and withdrawn win over expired. */
export function linkState(row: LinkRow | null | undefined, now: Date = new Date()): LinkState {
  if (!row) return 'unknown';
  if (row.usedAt) return 'used';
  if (row.revokedAt) return 'revoked';
  if (row.expiresAt.getTime() <= now.getTime()) return 'expired';
  return 'valid';
}

function day(at: Date): string {
  return (
    at.toLocaleString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZone: 'UTC' }) +
    ' UTC'
  );
}

/**
 * The message shown for a link that cannot be used. `askWhom` names who can send a new one
 * (the inviter, or "the facility admin").
 */
export function linkRefusal({
  state,
  kind,
  expiresAt,
  askWhom,
}: {
  state: Exclude<LinkState, 'valid'>;
  kind: 'invite' | 'reset';
  expiresAt?: Date;
  askWhom?: string;
}): string {
  const whom = askWhom || 'the facility admin';
  const again = kind === 'invite' ? `ask ${whom} for a new invitation` : 'ask for a new link on the “Forgot your password?” page';
  switch (state) {
    case 'used':
      return kind === 'invite'
        ? 'This link has already been used. If that was you, sign in with the password you chose; otherwise ' + again + '.'
        : 'This link has already been used. If you still need to reset your password, ' + again + '.';
    case 'expired':
      return `This link expired on ${expiresAt ? day(expiresAt) : 'an earlier date'}; ${again}.`;
    case 'revoked':
      return `This link was withdrawn (a newer link may have been sent); ${again}.`;
    default:
      return `This link is not valid. Check that you copied the whole address, or ${again}.`;
  }
}
