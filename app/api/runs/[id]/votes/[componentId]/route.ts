import { handler } from '@/lib/api/handler';
import { voteChangeSchema, voteParamsSchema } from '@/lib/desk/schemas';
import { saveVote } from '@/lib/votes/save-vote';
import { auditAddress as clientIp } from '@/lib/auth/client-address';

// PUT /api/runs/:id/votes/:componentId – record the caller's vote (fields merged, version-checked)
export const PUT = handler(
  { permission: 'votes.write', params: voteParamsSchema, body: voteChangeSchema, what: 'The vote' },
  async ({ req, user, params, body }) =>
    saveVote({ user, runId: params.id, componentId: params.componentId, change: body, ip: clientIp(req) }),
);
