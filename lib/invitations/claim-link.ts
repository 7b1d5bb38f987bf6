import 'server-only';
import { hashToken } from '@/lib/auth/tokens';
import { lockLinkByTokenHash, type LinkRecord } from '@/lib/db/queries/invitations';
import type { Trx } from '@/lib/db/transaction';
import { AppError } from '@/lib/errors';
import { describeLink } from './find-link';

/** Locks the link row of a token inside a transaction and refuses a link that cannot be used (409 with the message). */
export async function claimLink(trx: Trx, token: string, kind: 'invite' | 'reset', now: Date): Promise<LinkRecord> {
  const link = await lockLinkByTokenHash(trx, { tokenHash: hashToken(token), kind });
  const { state, message } = describeLink(link, kind, now);
  if (state === 'unknown') throw new AppError('not_found', message!);
  if (state !== 'valid') throw new AppError('conflict', message!);
  return link!;
}
