import { handler } from '@/lib/api/handler';
import { motionUploadQuerySchema, runIdParams } from '@/lib/runs/schema';
import { attachMotion, contentLengthOf } from '@/lib/runs/upload';

// PUT /api/runs/:id/motion?name=…&order=trans-first|rot-first&units=radians|degrees – attach a motion table (raw text body)
export const PUT = handler(
  { permission: 'runs.upload', params: runIdParams, query: motionUploadQuerySchema, what: 'The motion upload' },
  async ({ req, user, params, query }) =>
    attachMotion({ user, runId: params.id, query, raw: { body: req.body, contentLength: contentLengthOf(req), signal: req.signal } }),
);
