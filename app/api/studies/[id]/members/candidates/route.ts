import { handler } from '@/lib/api/handler';
import { ACCOUNT_SEARCH_LIMIT, accountSearchSchema, studyIdParams } from '@/lib/studies/schema';
import { findManagedStudy, findStudyForUser } from '@/lib/db/queries/studies';
import { searchAccounts } from '@/lib/db/queries/members';
import { forbidden, notFound } from '@/lib/errors';

// GET /api/studies/:id/members/candidates?q= – the member picker: active accounts by name or e-mail (at most 20), for those who manage the study
export const GET = handler({ permission: 'studies.update', params: studyIdParams, query: accountSearchSchema, what: 'The search' }, async ({ user, params, query }) => {
  if (!(await findManagedStudy({ user, studyId: params.id }))) {
    if (await findStudyForUser({ user, studyId: params.id })) throw forbidden('changing the members of this study');
    throw notFound('The study');
  }
  const found = await searchAccounts({ studyId: params.id, q: query.q, limit: ACCOUNT_SEARCH_LIMIT });
  return Response.json(found, { headers: { 'Cache-Control': 'private, no-store' } });
});
