import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { revokeAccessToken } from '@/lib/db/queries/access-tokens';
import { recordAudit } from '@/lib/db/queries/audit';
import { notFound } from '@/lib/errors';

const params = z.object({ tokenId: z.coerce.number().int().positive() });

// DELETE /api/account/tokens/:tokenId – revokes one of the caller's own tokens
export const DELETE = handler({ permission: 'tokens.manage', params, what: 'The token' }, async ({ user, params }) => {
  if (!(await revokeAccessToken({ userId: user.id, tokenId: params.tokenId }))) throw notFound('The token');
  await recordAudit({ actorId: user.id, action: 'token.revoke', targetType: 'personal_access_token', targetId: params.tokenId });
  return { revoked: true };
});
