import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { releaseFileResponse } from '@/lib/releases/serve-file';

const params = z.object({
  releaseId: z.coerce.number().int().positive(),
  name: z
    .string()
    .max(255)
    .regex(/^[A-Za-z0-9._-]+$/, 'a file name from the manifest'),
});

// GET /api/releases/:releaseId/files/:name – one file of a release (a name from its manifest)
export const GET = handler(
  { permission: 'exports.download', scope: 'release', params, what: 'The file request' },
  async ({ access, params }) => releaseFileResponse(access.release!, params.name),
);
