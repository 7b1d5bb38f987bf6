import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { recordLeadDecision } from '@/lib/consensus/record-lead-decision';
import { leadDecisionSchema } from '@/lib/consensus/schema';
import { AppError } from '@/lib/errors';
import { conflictMessage } from '@/lib/consensus/conflict-message';

const params = z.object({ id: z.coerce.number().int().positive() });

// POST /api/studies/:id/decisions – a lead decides a component (reconcile or override) with a reason
export const POST = handler(
  {
    permission: 'decisions.reconcile',
    params,
    body: leadDecisionSchema,
    what: 'The decision',
    scope: 'study',
    studyRule: 'lead',
    denied: 'deciding components of a study you do not lead',
  },
  async ({ user, access, body }) => {
    const result = await recordLeadDecision({ studyId: access.studyId, leadId: user.id, input: body });
    if ('conflict' in result) throw new AppError('conflict', conflictMessage(result.conflict));
    return { decision: result };
  },
);
