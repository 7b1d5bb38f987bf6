import { handler } from '@/lib/api/handler';
import { decomposeSettingsSchema, runIdParams } from '@/lib/runs/schema';
import { queueRun } from '@/lib/runs/actions';

// POST /api/runs/:id/queue – queue the decomposition (after attachments), or re-decompose with other settings
export const POST = handler(
  { permission: 'runs.manage', params: runIdParams, body: decomposeSettingsSchema, what: 'The decomposition settings' },
  async ({ user, params, body }) => ({ run: await queueRun({ user, runId: params.id, settings: body }) }),
);
