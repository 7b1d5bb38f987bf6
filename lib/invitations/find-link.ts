import 'server-only';
import { hashToken, linkRefusal, linkState, type LinkState } from '@/lib/auth/tokens';
import { findLinkByTokenHash, type LinkRecord } from '@/lib/db/queries/invitations';

/** The link for a token (any state), or null when no such token was issued. */
export async function findLinkByToken({ token, kind }: { token: string; kind: 'invite' | 'reset' }): Promise<LinkRecord | null> {
  return findLinkByTokenHash({ tokenHash: hashToken(token), kind });
}

/** The state of the link and, when it cannot be used, the message to show. */
export function describeLink(
  link: LinkRecord | null,
  kind: 'invite' | 'reset',
  now = new Date(),
): { state: LinkState; message: string | null } {
  const state = linkState(link, now);
  if (state === 'valid') return { state, message: null };
  return {
    state,
    message: linkRefusal({ state, kind, expiresAt: link?.expiresAt, askWhom: link?.inviterName ?? undefined }),
  };
}
