import { handler } from '@/lib/api/handler';
import { fileParamsSchema } from '@/lib/desk/schemas';
import { findRunFileKey } from '@/lib/runs/find-run-file';
import { storedFileResponse } from '@/lib/storage/respond';

// GET /api/runs/:id/files/:file – stream the run's component maps, mean image or mask (assigned rater only)
export const GET = handler({ permission: 'votes.write', params: fileParamsSchema, what: 'The file' }, async ({ user, params }) => {
  const { key, decompositionId } = await findRunFileKey({ user, runId: params.id, file: params.file });
  return storedFileResponse(key, {
    name: params.file,
    etag: `d${decompositionId}-${params.file}-${key.replace(/[^a-z0-9]/gi, '').slice(-12)}`, // a new structural upload is a new key
    cache: 'private-day', // the address carries the decomposition id (?d=…): a new decomposition is a new address
    missing: `The ${params.file} of run ${params.id} is missing from storage. Ask the facility admin to check the uploads folder.`,
  });
});
