import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { loadStudyRatings } from '@/lib/db/queries/agreement';
import { buildAgreementReport } from '@/lib/reports/agreement-report';
import { agreementReportCsv } from '@/lib/reports/agreement-csv';

const params = z.object({ id: z.coerce.number().int().positive() });
const query = z.object({ format: z.enum(['json', 'csv']).default('json') });

// GET /api/studies/:id/agreement – the study's agreement report (JSON, or CSV tables with ?format=csv)
export const GET = handler(
  { permission: 'agreement.read', scope: 'study', params, query, what: 'The agreement request' },
  async ({ access, params, query }) => {
    const ratings = await loadStudyRatings({ studyId: params.id });
    const report = buildAgreementReport(ratings);
    if (query.format === 'csv') {
      const names = new Map(report.raters.map((r) => [String(r.id), r.name]));
      return new Response(
        agreementReportCsv(report, (id) => names.get(id) ?? id),
        {
          headers: {
            'Content-Type': 'text/csv; charset=utf-8',
            'Content-Disposition': `attachment; filename="study-${params.id}_agreement.csv"`,
          },
        },
      );
    }
    return { study: { id: access.studyId, name: access.name }, report };
  },
);
