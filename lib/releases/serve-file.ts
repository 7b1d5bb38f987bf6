import 'server-only';
/** Streams one file of a release (by its file name in the manifest) after the caller's checks. */
import { Readable } from 'node:stream';
import type { ReleaseRow } from '@/lib/db/queries/releases';
import { notFound } from '@/lib/errors';
import { readStream, sizeOf } from '@/lib/storage';

export function mediaType(name: string): string {
  if (name.endsWith('.tsv')) return 'text/tab-separated-values; charset=utf-8';
  if (name.endsWith('.json')) return 'application/json; charset=utf-8';
  if (name.endsWith('.csv')) return 'text/csv; charset=utf-8';
  if (name.endsWith('.md')) return 'text/markdown; charset=utf-8';
  if (name.endsWith('.txt')) return 'text/plain; charset=utf-8';
  if (name.endsWith('.gz')) return 'application/gzip';
  return 'application/octet-stream';
}

export async function releaseFileResponse(release: ReleaseRow, name: string): Promise<Response> {
  const file = release.manifest?.files.find((f) => f.name === name);
  if (!file) throw notFound(`The file "${name}" in release ${release.id}`);
  const size = await sizeOf(file.key).catch(() => null);
  if (size == null) throw notFound(`The stored copy of "${name}"`);
  return new Response(Readable.toWeb(readStream(file.key)) as ReadableStream, {
    headers: {
      'Content-Type': mediaType(name),
      'Content-Length': String(size),
      'Content-Disposition': `attachment; filename="${name}"`,
      'X-Content-SHA256': file.sha256,
      'Cache-Control': 'private, no-store',
    },
  });
}
