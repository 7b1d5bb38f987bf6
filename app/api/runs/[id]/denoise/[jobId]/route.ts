import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { findDenoiseJob } from '@/lib/db/queries/exports';
import { AppError, notFound } from '@/lib/errors';
import { storedFileResponse } from '@/lib/storage/respond';

const params = z.object({ id: z.coerce.number().int().positive(), jobId: z.coerce.number().int().positive() });

// GET /api/runs/:id/denoise/:jobId – the denoised NIfTI of a finished request
export const GET = handler({ permission: 'exports.download', scope: 'run', params, what: 'The download' }, async ({ params }) => {
  const job = await findDenoiseJob({ runId: params.id, jobId: params.jobId });
  if (!job) throw notFound('The denoise request');
  if (job.status !== 'succeeded' || !job.result)
    throw new AppError(
      'conflict',
      `The denoised file is not ready (the request is ${job.status}${job.percent != null ? `, ${Math.round(job.percent)} %` : ''}).`,
    );
  return storedFileResponse(job.result.key, {
    name: job.result.name,
    download: true,
    sha256: job.result.sha256,
    missing: 'The stored denoised file was not found.',
  });
});
