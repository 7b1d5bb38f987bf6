import { handler } from '@/lib/api/handler';
import { auditPageSchema } from '@/lib/audit/schema';
import { queryAuditLog } from '@/lib/db/queries/audit-log';

// GET /api/admin/audit – one page of the audit log, filtered by actor, action, study and dates.
// The log is append-only: there is no PUT, PATCH or DELETE here.
export const GET = handler({ permission: 'audit.read', query: auditPageSchema, what: 'The audit filter' }, async ({ query }) => {
  const { page, pageSize, ...filter } = query;
  return queryAuditLog({ filter, page, pageSize });
});
