import 'server-only';
/**
 * Personal access tokens for pipelines: `qrm_` + 32 random bytes (base64url), shown once, stored
 * only as their sha256 (hex) with a short prefix for the UI. The only scope is `releases:read`: a
 * token reads released noise lists and files and can never write. Bearer authentication checks the
 * hash, revocation, expiry, that the owner is active and still has the read permissions, and
 * records last_used_at.
 */
import { createHash } from 'node:crypto';
import { can } from './permissions';
import type { Role } from '@/lib/vocabulary/roles';
import { findTokenByHash, touchAccessToken } from '@/lib/db/queries/access-tokens';
import { AppError } from '@/lib/errors';

export const TOKEN_SCOPE = 'releases:read';
export const TOKEN_PREFIX = 'qrm_';

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

export type TokenUser = { id: number; role: Role; name: string; tokenId: number };

const bearerError = (message: string) => {
  const e = new AppError('unauthenticated', message);
  return e;
};

/** The user behind the request's `Authorization: Bearer …` token; 401 for a missing, wrong, revoked or expired token. */
export async function authenticateBearer(req: Request): Promise<TokenUser> {
  const header = req.headers.get('authorization') ?? '';
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  if (!m) throw bearerError('Send a personal access token as "Authorization: Bearer <token>" (create one on your account page).');
  const row = await findTokenByHash({ tokenHash: hashToken(m[1]!) });
  if (!row) throw bearerError('The access token is not valid.');
  if (row.revokedAt) throw bearerError('The access token was revoked; create a new one on your account page.');
  if (row.expiresAt && new Date(row.expiresAt).getTime() < Date.now())
    throw bearerError('The access token has expired; create a new one on your account page.');
  if (!row.active) throw bearerError('The account of this access token is deactivated.');
  if (row.scope !== TOKEN_SCOPE || !can(row.role, 'releases.read') || !can(row.role, 'exports.download')) {
    throw new AppError('forbidden', "This token's account may not read releases.");
  }
  await touchAccessToken({ tokenId: Number(row.id) });
  return { id: Number(row.userId), role: row.role, name: row.name, tokenId: Number(row.id) };
}

/** The answer to any writing method on the token API. */
export function readOnlyResponse(): Response {
  return Response.json(
    {
      error: {
        code: 'method_not_allowed',
        message: 'The pipeline API is read-only: access tokens can only GET released noise lists and files.',
      },
    },
    { status: 405, headers: { Allow: 'GET' } },
  );
}
