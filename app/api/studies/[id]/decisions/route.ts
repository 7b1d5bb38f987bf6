import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { recordLeadDecision } from '@/lib/db/queries/reconcile';
import { leadDecisionSchema } from '@/lib/consensus/schema';
import { AppError, forbidden, notFound } from '@/lib/errors';
import { conflictMessage } from '@/lib/consensus/conflict-message';

const params = z.object({ id: z.coerce.number().int().positive() });

// POST /api/studies/:id/decisions – a lead decides a component (reconcile or override) with a reason
export const POST = handler({ permission: 'decisions.reconcile', params, body: leadDecisionSchema, what: 'The decision' }, async ({ user, params, body }) => {
  const access = await findStudyAccess({ user, studyId: params.id });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('deciding components of a study you do not lead');
  const result = await recordLeadDecision({ studyId: params.id, leadId: user.id, input: body });
  if ('conflict' in result) throw new AppError('conflict', conflictMessage(result.conflict));
  return { decision: result };
});
