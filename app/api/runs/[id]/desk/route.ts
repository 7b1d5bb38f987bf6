import { handler } from '@/lib/api/handler';
import { deskPositionSchema, runParamsSchema } from '@/lib/desk/schemas';
import { saveDeskPosition } from '@/lib/runs/save-desk-position';

// PUT /api/runs/:id/desk – remember which component the rater is looking at
export const PUT = handler(
  { permission: 'votes.write', params: runParamsSchema, body: deskPositionSchema, what: 'The desk position' },
  async ({ user, params, body }) => saveDeskPosition({ user, runId: params.id, componentIdx: body.componentIdx }),
);
