import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { revokeToken } from '@/lib/tokens/revoke-token';

const params = z.object({ tokenId: z.coerce.number().int().positive() });

// DELETE /api/account/tokens/:tokenId – revokes one of the caller's own tokens
export const DELETE = handler({ permission: 'tokens.manage', params, what: 'The token' }, async ({ user, params }) => {
  await revokeToken({ userId: user.id, tokenId: params.tokenId });
  return { revoked: true };
});
