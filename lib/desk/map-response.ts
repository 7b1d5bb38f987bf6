import 'server-only';
/**
 * The HTTP answer for the desk's map payload (after the caller's authorisation checks): binary
 * (application/octet-stream, which the server does not compress on the fly), cached privately for
 * a day with an ETag naming the decomposition and the part (a new decomposition is a new address,
 * ?d=…), 304 when the browser already holds it.
 */
import { AppError } from '@/lib/errors';
import { MAX_MAPS_PER_REQUEST, openDeskMaps } from './map-store';

export async function deskMapsResponse(
  req: Request,
  opts: { runId: number; decompositionId: number; componentsKey: string | null; maskKey: string | null; part: string },
): Promise<Response> {
  const { runId, part } = opts;
  if (!opts.componentsKey) throw new AppError('not_found', `Run ${runId} has no component maps yet; its decomposition did not write them.`);
  let range: [number, number] | null = null;
  if (part !== 'layout') {
    const [from, to] = part.split('-').map(Number) as [number, number];
    if (to < from || to - from + 1 > MAX_MAPS_PER_REQUEST) {
      throw new AppError('validation', `Ask for 1 to ${MAX_MAPS_PER_REQUEST} components in order, e.g. 1-8; ${part} is not such a range.`, {
        part: [`must be a range of 1 to ${MAX_MAPS_PER_REQUEST} components`],
      });
    }
    range = [from, to];
  }
  const etag = `"d${opts.decompositionId}-maps-${part}"`;
  const headers: Record<string, string> = {
    'Content-Type': 'application/octet-stream',
    'Cache-Control': 'private, max-age=86400',
    ETag: etag,
  };
  const file = await openDeskMaps(opts.componentsKey, opts.maskKey).catch((err: NodeJS.ErrnoException) => {
    if (err.code === 'ENOENT')
      throw new AppError(
        'not_found',
        `The component maps of run ${runId} are missing from storage. Ask the facility admin to check the uploads folder.`,
      );
    throw err;
  });
  if (range && range[1] > file.k) {
    throw new AppError('not_found', `Run ${runId} has ${file.k} components; ${part} goes beyond them.`);
  }
  if (req.headers.get('if-none-match') === etag) return new Response(null, { status: 304, headers });
  const body = range ? await file.maps(range[0], range[1]) : await file.layout();
  headers['Content-Length'] = String(body.byteLength);
  return new Response(body as Uint8Array<ArrayBuffer>, { headers });
}
