import { handler } from '@/lib/api/handler';
import { auditFilterSchema } from '../schema';
import { iterateAuditLog, type AuditRow } from '@/lib/db/queries/audit-log';

const HEADER = ['id', 'time_utc', 'actor_id', 'actor_name', 'actor_email', 'action', 'target_type', 'target_id', 'study_id', 'study_name', 'detail', 'ip'];

/** One CSV field (RFC 4180 quoting); a leading = + - @ is prefixed with ' so spreadsheets do not run it. */
function field(value: unknown): string {
  if (value === null || value === undefined) return '';
  let s = value instanceof Date ? value.toISOString() : typeof value === 'object' ? JSON.stringify(value) : String(value);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function line(r: AuditRow): string {
  return [r.id, r.createdAt, r.actorId, r.actorName, r.actorEmail, r.action, r.targetType, r.targetId, r.studyId, r.studyName, r.detail, r.ip].map(field).join(',') + '\r\n';
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
