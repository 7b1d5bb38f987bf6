import { Readable } from 'node:stream';
import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { findDenoiseJob, runStudy } from '@/lib/db/queries/exports';
import { AppError, notFound } from '@/lib/errors';
import { readStream, sizeOf } from '@/lib/storage';

const params = z.object({ id: z.coerce.number().int().positive(), jobId: z.coerce.number().int().positive() });

// GET /api/runs/:id/denoise/:jobId – the denoised NIfTI of a finished request
export const GET = handler({ permission: 'exports.download', params, what: 'The download' }, async ({ user, params }) => {
  const run = await runStudy({ runId: params.id });
  const access = run ? await findStudyAccess({ user, studyId: run.studyId }) : null;
  const job = access ? await findDenoiseJob({ runId: params.id, jobId: params.jobId }) : null;
  if (!job) throw notFound('The denoise request');
  if (job.status !== 'succeeded' || !job.result) throw new AppError('conflict', `The denoised file is not ready (the request is ${job.status}${job.percent != null ? `, ${Math.round(job.percent)} %` : ''}).`);
  const size = await sizeOf(job.result.key).catch(() => null);
  if (size == null) throw notFound('The stored denoised file');
  return new Response(Readable.toWeb(readStream(job.result.key)) as ReadableStream, {
    headers: {
      'Content-Type': 'application/gzip',
      'Content-Length': String(size),
      'Content-Disposition': `attachment; filename="${job.result.name}"`,
      'X-Content-SHA256': job.result.sha256,
      'Cache-Control': 'private, no-store',
    },
  });
});
