import { handler } from '@/lib/api/handler';
import { runParamsSchema } from '@/lib/desk/schemas';
import { deskSeriesVersion, loadDeskSeries } from '@/lib/runs/load-desk-series';

// GET /api/runs/:id/series – the time courses and spectra of the components the desk lists, in one
// binary payload (assigned rater only). Revalidated on each use: 304 while the content is the same.
export const GET = handler(
  { permission: 'votes.write', params: runParamsSchema, what: 'The series payload' },
  async ({ req, user, params }) => {
    const etag = `"${await deskSeriesVersion({ user, runId: params.id })}"`;
    const headers: Record<string, string> = {
      'Content-Type': 'application/octet-stream',
      'Cache-Control': 'private, no-cache',
      ETag: etag,
    };
    if (req.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
    const body = await loadDeskSeries({ user, runId: params.id });
    headers['Content-Length'] = String(body.byteLength);
    return new Response(body as Uint8Array<ArrayBuffer>, { headers });
  },
);
