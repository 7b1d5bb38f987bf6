import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { findReleaseJob } from '@/lib/db/queries/releases';
import { notFound } from '@/lib/errors';

const params = z.object({ id: z.coerce.number().int().positive(), jobId: z.coerce.number().int().positive() });

// GET /api/studies/:id/releases/jobs/:jobId – a release being built: status, stage, percent, the
// worker's message and, once done, { releaseId, version, files }
export const GET = handler(
  { permission: 'releases.read', scope: 'study', params, what: 'The release progress request' },
  async ({ params }) => {
    const job = await findReleaseJob({ studyId: params.id, jobId: params.jobId });
    if (!job) throw notFound('The release job');
    return job;
  },
);
