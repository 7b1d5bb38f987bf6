import { handler } from '@/lib/api/handler';
import { auditFilterSchema } from '@/lib/audit/schema';
import { iterateAuditLog, type AuditRow } from '@/lib/db/queries/audit-log';
import { csvLine } from '@/lib/exports/tabular';

const HEADER = [
  'id',
  'time_utc',
  'actor_id',
  'actor_name',
  'actor_email',
  'action',
  'target_type',
  'target_id',
  'study_id',
  'study_name',
  'detail',
  'ip',
];

function line(r: AuditRow): string {
  return (
    csvLine([
      r.id,
      r.createdAt,
      r.actorId,
      r.actorName,
      r.actorEmail,
      r.action,
      r.targetType,
      r.targetId,
      r.studyId,
      r.studyName,
      r.detail,
      r.ip,
    ]) + '\r\n'
  );
}

// GET /api/admin/audit/export – the filtered audit log as CSV, streamed in batches
export const GET = handler({ permission: 'audit.read', query: auditFilterSchema, what: 'The audit filter' }, async ({ query }) => {
  const rows = iterateAuditLog({ filter: query });
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(encoder.encode(HEADER.join(',') + '\r\n'));
    },
    async pull(controller) {
      try {
        let chunk = '';
        for (let i = 0; i < 200; i++) {
          const next = await rows.next();
          if (next.done) {
            if (chunk) controller.enqueue(encoder.encode(chunk));
            controller.close();
            return;
          }
          chunk += line(next.value);
        }
        controller.enqueue(encoder.encode(chunk));
      } catch (err) {
        console.error('[audit export] failed while streaming:', err);
        controller.error(err);
      }
    },
    async cancel() {
      await rows.return(undefined);
    },
  });
  const stamp = new Date().toISOString().slice(0, 10);
  return new Response(stream, {
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="quorum-audit-${stamp}.csv"`,
      'Cache-Control': 'no-store',
    },
  });
});
