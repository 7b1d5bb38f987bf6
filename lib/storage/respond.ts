/**
 * Streams a stored file as an HTTP response (after the caller's authorisation checks): size from
 * the file system, type from the name, never the whole file in memory. A key whose file is gone
 * answers 404 with `missing` as the message.
 */
import { Readable } from 'node:stream';
import { AppError } from '@/lib/errors';
import { readStream, sizeOf } from './index';

export function mediaType(name: string): string {
  if (name.endsWith('.tsv')) return 'text/tab-separated-values; charset=utf-8';
  if (name.endsWith('.json')) return 'application/json; charset=utf-8';
  if (name.endsWith('.csv')) return 'text/csv; charset=utf-8';
  if (name.endsWith('.md')) return 'text/markdown; charset=utf-8';
  if (name.endsWith('.txt')) return 'text/plain; charset=utf-8';
  if (name.endsWith('.gz')) return 'application/gzip';
  return 'application/octet-stream';
}

export async function storedFileResponse(
  key: string,
  opts: { name: string; missing: string; download?: boolean; sha256?: string; etag?: string; cache?: 'private-day' | 'no-store' },
): Promise<Response> {
  const size = await sizeOf(key).catch(() => null);
  if (size == null) throw new AppError('not_found', opts.missing);
  const headers: Record<string, string> = {
    'Content-Type': mediaType(opts.name),
    'Content-Length': String(size),
    'Cache-Control': opts.cache === 'private-day' ? 'private, max-age=86400' : 'private, no-store',
  };
  if (opts.download) headers['Content-Disposition'] = `attachment; filename="${opts.name}"`;
  if (opts.sha256) headers['X-Content-SHA256'] = opts.sha256;
  if (opts.etag) headers.ETag = `"${opts.etag}"`;
  return new Response(Readable.toWeb(readStream(key)) as ReadableStream, { headers });
}
