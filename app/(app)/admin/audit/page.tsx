import type { Metadata } from 'next';
import Link from 'next/link';
import { requirePageUser } from '@/lib/auth/session';
import { auditFilterChoices, queryAuditLog } from '@/lib/db/queries/audit-log';
import { auditPageSchema } from '@/lib/audit/schema';
import { Panel } from '@/components/ui/panel';
import { Notice } from '@/components/ui/notice';
import { AdminTabs } from '@/components/admin/admin-tabs';
import { AuditFilters } from '@/components/admin/audit-filters';
import { utcMinute } from '@/components/admin/format';

export const metadata: Metadata = { title: 'Audit log' };

function describe(detail: Record<string, unknown> | null): string {
  if (!detail) return '';
  return Object.entries(detail)
    .filter(([, v]) => v !== null && v !== undefined)
    .map(([k, v]) => `${k}: ${typeof v === 'object' ? JSON.stringify(v) : String(v)}`)
    .join(' · ');
}

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const user = await requirePageUser('audit.read');
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  const parsed = auditPageSchema.safeParse(raw);
  const query = parsed.success ? parsed.data : auditPageSchema.parse({});
  const { page, pageSize, ...filter } = query;
  const [result, choices] = await Promise.all([queryAuditLog({ filter, page, pageSize }), auditFilterChoices()]);
  const pages = Math.max(1, Math.ceil(result.total / pageSize));
  const filterQuery = new URLSearchParams(
    Object.entries(filter)
      .filter(([, v]) => v !== undefined && v !== '')
      .map(([k, v]) => [k, String(v)]),
  );
  const pageHref = (p: number) => {
    const q = new URLSearchParams(filterQuery);
    q.set('page', String(p));
    return `/admin/audit?${q}`;
  };
  const initial = {
    actorId: filter.actorId ? String(filter.actorId) : '',
    action: filter.action ?? '',
    studyId: filter.studyId ? String(filter.studyId) : '',
    from: filter.from ?? '',
    to: filter.to ?? '',
  };
  return (
    <div className="flex flex-col gap-6">
      <h1 className="text-xl font-semibold">Facility</h1>
      <AdminTabs role={user.role} current="/admin/audit" />
      <Panel
        title="Audit log"
        actions={
          <a
            href={`/api/admin/audit/export${filterQuery.size ? `?${filterQuery}` : ''}`}
            className="text-sm text-lumen hover:text-lumen-strong"
            data-testid="audit-export"
          >
            Download CSV
          </a>
        }
      >
        <div className="flex flex-col gap-4">
          <AuditFilters initial={initial} choices={choices} />
          {!parsed.success ? <Notice kind="error">The filter in the address is not valid; showing everything.</Notice> : null}
          <p className="text-xs text-ink-faint" data-testid="audit-total">
            {result.total} entries · page {page} of {pages} · the log is append-only
          </p>
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="audit-table">
              <thead className="text-xs text-ink-faint">
                <tr>
                  <th className="py-1 pr-3 font-medium">Time (UTC)</th>
                  <th className="py-1 pr-3 font-medium">Actor</th>
                  <th className="py-1 pr-3 font-medium">Action</th>
                  <th className="py-1 pr-3 font-medium">Target</th>
                  <th className="py-1 pr-3 font-medium">Study</th>
                  <th className="py-1 pr-3 font-medium">Detail</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line">
                {result.entries.map((e) => (
                  <tr key={e.id} data-testid="audit-row">
                    <td className="py-1.5 pr-3 tabular-nums text-ink-muted">{utcMinute(e.createdAt)}</td>
                    <td className="py-1.5 pr-3">{e.actorName ?? (e.actorId ? `#${e.actorId}` : 'system / anonymous')}</td>
                    <td className="py-1.5 pr-3 font-mono text-xs">{e.action}</td>
                    <td className="py-1.5 pr-3 text-ink-muted">
                      {e.targetType ? `${e.targetType}${e.targetId ? ` #${e.targetId}` : ''}` : '—'}
                    </td>
                    <td className="py-1.5 pr-3 text-ink-muted">{e.studyName ?? '—'}</td>
                    <td className="py-1.5 pr-3 text-xs text-ink-muted">{describe(e.detail)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <nav aria-label="Audit pages" className="flex gap-3 text-sm">
            {page > 1 ? (
              <Link href={pageHref(page - 1)} className="text-lumen hover:text-lumen-strong">
                ← Newer
              </Link>
            ) : null}
            {page < pages ? (
              <Link href={pageHref(page + 1)} className="text-lumen hover:text-lumen-strong" data-testid="audit-older">
                Older →
              </Link>
            ) : null}
          </nav>
        </div>
      </Panel>
    </div>
  );
}
