import { handler } from '@/lib/api/handler';
import { ACCOUNT_SEARCH_LIMIT, accountSearchSchema, studyIdParams } from '@/lib/studies/schema';
import { searchAccounts } from '@/lib/db/queries/members';

// GET /api/studies/:id/members/candidates?q= – the member picker: active accounts by name or e-mail (at most 20), for those who manage the study
export const GET = handler(
  {
    permission: 'studies.update',
    params: studyIdParams,
    query: accountSearchSchema,
    what: 'The search',
    scope: 'study',
    studyRule: 'lead',
    denied: 'changing the members of this study',
  },
  async ({ access, query }) => {
    const found = await searchAccounts({ studyId: access.studyId, q: query.q, limit: ACCOUNT_SEARCH_LIMIT });
    return Response.json(found, { headers: { 'Cache-Control': 'private, no-store' } });
  },
);
