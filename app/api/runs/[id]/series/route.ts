import { handler } from '@/lib/api/handler';
import { runParamsSchema } from '@/lib/desk/schemas';
import { loadDeskSeries } from '@/lib/runs/load-desk-series';

// GET /api/runs/:id/series – the time courses and spectra of the components the desk lists, in one
// binary payload (assigned rater only). Revalidated on each use: 304 while the content is the same.
export const GET = handler(
  { permission: 'votes.write', params: runParamsSchema, what: 'The series payload' },
  async ({ req, user, params }) => {
    const held = req.headers.get('if-none-match')?.replace(/^"|"$/g, '') ?? null;
    const { version, bytes } = await loadDeskSeries({ user, runId: params.id, unless: held });
    const headers: Record<string, string> = {
      'Content-Type': 'application/octet-stream',
      'Cache-Control': 'private, no-cache',
      ETag: `"${version}"`,
    };
    if (!bytes) return new Response(null, { status: 304, headers });
    headers['Content-Length'] = String(bytes.byteLength);
    return new Response(bytes as Uint8Array<ArrayBuffer>, { headers });
  },
);
