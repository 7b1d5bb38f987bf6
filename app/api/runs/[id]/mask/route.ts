import { handler } from '@/lib/api/handler';
import { maskUploadQuerySchema, runIdParams } from '@/lib/runs/schema';
import { attachMask, contentLengthOf } from '@/lib/runs/upload';

// PUT /api/runs/:id/mask?name=… – attach a brain mask on the run's grid (raw NIfTI body)
export const PUT = handler(
  { permission: 'runs.upload', params: runIdParams, query: maskUploadQuerySchema, what: 'The mask upload' },
  async ({ req, user, params, query }) =>
    attachMask({
      user,
      runId: params.id,
      name: query.name,
      raw: { body: req.body, contentLength: contentLengthOf(req), signal: req.signal },
    }),
);
