import 'server-only';
import { randomBytes } from 'node:crypto';
import { hashToken, TOKEN_PREFIX, TOKEN_SCOPE } from '@/lib/auth/access-tokens';
import { insertAccessToken } from '@/lib/db/queries/access-tokens';
import { recordAudit } from '@/lib/db/queries/audit';
import { inTransaction } from '@/lib/db/transaction';

/**
 * Issues a personal access token (read-only, releases:read) and records it in the audit log, in one
 * transaction: a token exists only with its audit entry. The secret is returned here only; the
 * database keeps its sha256 and a short prefix for the token list.
 */
export async function issueToken({ userId, name, expiresInDays }: { userId: number; name: string; expiresInDays?: number | null }) {
  const token = TOKEN_PREFIX + randomBytes(32).toString('base64url');
  const prefix = token.slice(0, 10);
  const expiresAt = expiresInDays ? new Date(Date.now() + expiresInDays * 86400_000) : null;
  const id = await inTransaction(async (trx) => {
    const id = await insertAccessToken(
      { userId, name, tokenHash: hashToken(token), tokenPrefix: prefix, scope: TOKEN_SCOPE, expiresAt },
      trx,
    );
    await recordAudit(
      { actorId: userId, action: 'token.create', targetType: 'personal_access_token', targetId: id, detail: { name, scope: TOKEN_SCOPE } },
      trx,
    );
    return id;
  });
  return { id, token, prefix, scope: TOKEN_SCOPE, expiresAt };
}
