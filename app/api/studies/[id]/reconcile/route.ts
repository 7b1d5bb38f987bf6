import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import { leadsStudy } from '@/lib/auth/permissions';
import { listReconcileItems } from '@/lib/db/queries/reconcile';
import { reconcileQuerySchema } from '@/lib/consensus/schema';
import { forbidden, notFound } from '@/lib/errors';

const params = z.object({ id: z.coerce.number().int().positive() });

// GET /api/studies/:id/reconcile – the lead's queue of components whose votes need a decision
export const GET = handler({ permission: 'decisions.reconcile', params, query: reconcileQuerySchema }, async ({ user, params, query }) => {
  const access = await findStudyAccess({ user, studyId: params.id });
  if (!access) throw notFound('The study');
  if (!leadsStudy(access)) throw forbidden('reconciling a study you do not lead');
  return { items: await listReconcileItems({ studyId: params.id, ...query }) };
});
