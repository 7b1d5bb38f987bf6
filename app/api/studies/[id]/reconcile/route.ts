import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { listReconcileItems } from '@/lib/db/queries/reconcile';
import { reconcileQuerySchema } from '@/lib/consensus/schema';

const params = z.object({ id: z.coerce.number().int().positive() });

// GET /api/studies/:id/reconcile – the lead's queue of components whose votes need a decision
export const GET = handler(
  {
    permission: 'decisions.reconcile',
    params,
    query: reconcileQuerySchema,
    scope: 'study',
    studyRule: 'lead',
    denied: 'reconciling a study you do not lead',
  },
  async ({ access, query }) => ({ items: await listReconcileItems({ studyId: access.studyId, ...query }) }),
);
