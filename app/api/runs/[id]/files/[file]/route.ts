import { Readable } from 'node:stream';
import { handler } from '@/lib/api/handler';
import { fileParamsSchema } from '@/lib/desk/schemas';
import { findRunFileKey } from '@/lib/db/queries/desk';
import { readStream, sizeOf } from '@/lib/storage';
import { AppError } from '@/lib/errors';

// GET /api/runs/:id/files/:file – stream the run's component maps, mean image or mask (assigned rater only)
export const GET = handler({ permission: 'votes.write', params: fileParamsSchema, what: 'The file' }, async ({ user, params }) => {
  const { key, decompositionId } = await findRunFileKey({ user, runId: params.id, file: params.file });
  let size: number;
  try {
    size = await sizeOf(key);
  } catch {
    throw new AppError('not_found', `The ${params.file} of run ${params.id} is missing from storage. Ask the facility admin to check the uploads folder.`);
  }
  return new Response(Readable.toWeb(readStream(key)) as ReadableStream, {
    headers: {
      'Content-Type': 'application/gzip',
      'Content-Length': String(size),
      // the address carries the decomposition id (?d=…), so a new decomposition is a new address
      'Cache-Control': 'private, max-age=86400',
      ETag: `"d${decompositionId}-${params.file}"`,
    },
  });
});
