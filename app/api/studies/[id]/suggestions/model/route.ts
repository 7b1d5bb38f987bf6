import { handler } from '@/lib/api/handler';
import { exportSuggestionModel } from '@/lib/suggestions/export-suggestion-model';
import { suggestionStudyParamsSchema } from '@/lib/suggestions/schema';

// GET /api/studies/:id/suggestions/model – the model in use as JSON (coefficients or trees, feature definitions, training releases)
export const GET = handler(
  { permission: 'agreement.read', params: suggestionStudyParamsSchema, what: 'The suggestion model' },
  async ({ user, params }) => {
    const { fileName, json } = await exportSuggestionModel({ user, studyId: params.id });
    return new Response(JSON.stringify(json, null, 1), {
      headers: {
        'Content-Type': 'application/json; charset=utf-8',
        'Content-Disposition': `attachment; filename="${fileName}"`,
        'Cache-Control': 'private, no-store',
      },
    });
  },
);
