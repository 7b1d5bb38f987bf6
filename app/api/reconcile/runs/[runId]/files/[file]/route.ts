import { Readable } from 'node:stream';
import { handler } from '@/lib/api/handler';
import { loadRunForReview } from '@/lib/db/queries/run-review';
import { reviewFileParams } from '@/lib/consensus/review-schemas';
import { readStream, sizeOf } from '@/lib/storage';
import { AppError } from '@/lib/errors';

// GET /api/reconcile/runs/:runId/files/:file – stream a run's maps or mean image to the lead reconciling it
export const GET = handler({ permission: 'decisions.reconcile', params: reviewFileParams, what: 'The file' }, async ({ user, params }) => {
  const { run, files } = await loadRunForReview({ user, runId: params.runId });
  const key = files[params.file];
  if (!key) throw new AppError('not_found', `Run ${params.runId} has no ${params.file}; its decomposition did not write it.`);
  let size: number;
  try {
    size = await sizeOf(key);
  } catch {
    throw new AppError('not_found', `The ${params.file} of run ${params.runId} is missing from storage. Ask the facility admin to check the uploads folder.`);
  }
  return new Response(Readable.toWeb(readStream(key)) as ReadableStream, {
    headers: {
      'Content-Type': 'application/gzip',
      'Content-Length': String(size),
      'Cache-Control': 'private, max-age=86400',
      ETag: `"d${run.decompositionId}-${params.file}"`,
    },
  });
});
