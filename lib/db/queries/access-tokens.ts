import 'server-only';
import type { Knex } from 'knex';
import { db } from '@/lib/db/knex';

export type AccessTokenRow = {
  id: number;
  name: string;
  tokenPrefix: string | null;
  scope: string;
  lastUsedAt: Date | null;
  expiresAt: Date | null;
  revokedAt: Date | null;
  createdAt: Date;
};

const COLUMNS = [
  'id',
  'name',
  'token_prefix as tokenPrefix',
  'scope',
  'last_used_at as lastUsedAt',
  'expires_at as expiresAt',
  'revoked_at as revokedAt',
  'created_at as createdAt',
];

/** A user's tokens (never the hash), newest first. */
export async function listAccessTokens({ userId }: { userId: number }): Promise<AccessTokenRow[]> {
  return db('personal_access_tokens').where({ user_id: userId }).orderBy('id', 'desc').select(COLUMNS);
}

export async function insertAccessToken(
  t: { userId: number; name: string; tokenHash: string; tokenPrefix: string; scope: string; expiresAt: Date | null },
  trx: Knex | Knex.Transaction = db,
): Promise<number> {
  const [id] = await trx('personal_access_tokens').insert({
    user_id: t.userId,
    name: t.name,
    token_hash: t.tokenHash,
    token_prefix: t.tokenPrefix,
    scope: t.scope,
    expires_at: t.expiresAt,
  });
  return Number(id);
}

/** Revokes one of the user's own tokens; false when there is no such live token. */
export async function revokeAccessToken(
  { userId, tokenId }: { userId: number; tokenId: number },
  trx: Knex | Knex.Transaction = db,
): Promise<boolean> {
  const n = await trx('personal_access_tokens')
    .where({ id: tokenId, user_id: userId })
    .whereNull('revoked_at')
    .update({ revoked_at: trx.raw('NOW(3)') });
  return n > 0;
}

/** The token with this hash and its owner's role and state (for Bearer authentication). */
export async function findTokenByHash({ tokenHash }: { tokenHash: string }) {
  return db('personal_access_tokens as t')
    .join('users as u', 'u.id', 't.user_id')
    .where('t.token_hash', tokenHash)
    .first(
      't.id',
      't.user_id as userId',
      't.scope',
      't.revoked_at as revokedAt',
      't.expires_at as expiresAt',
      'u.role',
      'u.active',
      'u.name',
      'u.email',
    );
}

export async function touchAccessToken({ tokenId }: { tokenId: number }): Promise<void> {
  await db('personal_access_tokens')
    .where({ id: tokenId })
    .update({ last_used_at: db.raw('NOW(3)') });
}
