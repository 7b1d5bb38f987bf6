import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { readOnlyResponse } from '@/lib/auth/access-tokens';
import { releaseFileResponse } from '@/lib/releases/serve-file';

const params = z.object({
  releaseId: z.coerce.number().int().positive(),
  name: z
    .string()
    .max(255)
    .regex(/^[A-Za-z0-9._-]+$/, 'a file name from the manifest'),
});

// GET /api/v1/releases/:releaseId/files/:name – (Bearer token) one file of a release the token's owner may see
export const GET = handler(
  { auth: 'token', permission: 'exports.download', scope: 'release', params, what: 'The pipeline file request' },
  async ({ access, params }) => releaseFileResponse(access.release!, params.name),
);

const refuse = handler({ permission: 'public', what: 'The pipeline request' }, async () => readOnlyResponse());
export { refuse as POST, refuse as PUT, refuse as PATCH, refuse as DELETE };
