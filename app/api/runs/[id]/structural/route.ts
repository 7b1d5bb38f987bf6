import { handler } from '@/lib/api/handler';
import { maskUploadQuerySchema, runIdParams } from '@/lib/runs/schema';
import { contentLengthOf } from '@/lib/runs/upload';
import { attachStructural } from '@/lib/runs/attach-structural';

// PUT /api/runs/:id/structural?name=… – attach a structural underlay on the run's grid (raw NIfTI body; study leads)
export const PUT = handler(
  { permission: 'runs.upload', params: runIdParams, query: maskUploadQuerySchema, what: 'The structural image upload' },
  async ({ req, user, params, query }) =>
    attachStructural({
      user,
      runId: params.id,
      name: query.name,
      raw: { body: req.body, contentLength: contentLengthOf(req), signal: req.signal },
    }),
);
