import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { listAccessTokens } from '@/lib/db/queries/access-tokens';
import { issueToken } from '@/lib/tokens/issue-token';
import { wellFormed } from '@/lib/text';

const body = z.object({
  name: z
    .string()
    .trim()
    .min(1, 'Give the token a name, e.g. the pipeline that uses it.')
    .max(120)
    .refine(...wellFormed('The name')),
  expiresInDays: z.coerce.number().int().min(1).max(3650).optional(),
});

// GET /api/account/tokens – the caller's personal access tokens (never the secret)
export const GET = handler({ permission: 'tokens.manage', what: 'The token list' }, async ({ user }) => ({
  tokens: await listAccessTokens({ userId: user.id }),
}));

// POST /api/account/tokens – creates a read-only token (releases:read); the secret is in this answer only
export const POST = handler({ permission: 'tokens.manage', body, what: 'The token' }, async ({ user, body }) => {
  const created = await issueToken({ userId: user.id, name: body.name, expiresInDays: body.expiresInDays ?? null });
  return Response.json(created, { status: 201 });
});
