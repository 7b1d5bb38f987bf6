/**
 * Request guards the route wrapper (lib/api/handler.ts) applies before any handler code runs:
 * the origin check for state-changing requests (issue 13 item 3), the JSON-only body rule and the
 * body size cap (issue 13 item 1). Uploads do not declare a JSON body and keep their own streamed
 * limit (lib/runs/receive.ts).
 */
import { AppError } from '@/lib/errors';

/** The largest JSON body a route handler reads, in bytes. The biggest legitimate body (a 1000-run list) is well under it. */
export const MAX_JSON_BODY_BYTES = 64 * 1024;

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** The origins this server answers as: its configured public address and the address the request was sent to. */
function ownOrigins(req: Request): Set<string> {
  const own = new Set<string>();
  for (const configured of [process.env.QUORUM_PUBLIC_URL, process.env.NEXTAUTH_URL]) {
    if (!configured?.trim()) continue;
    try {
      own.add(new URL(configured.trim()).origin);
    } catch {
      /* a malformed setting is reported where it is used (mail links, next-auth) */
    }
  }
  const host = (process.env.QUORUM_TRUST_PROXY === '1' && req.headers.get('x-forwarded-host')) || req.headers.get('host');
  const url = new URL(req.url);
  own.add(url.origin);
  if (host) own.add(`${url.protocol}//${host.split(',')[0]!.trim()}`);
  return own;
}

/**
 * Refuses a state-changing request whose Origin (or, without one, Referer) is another site: a page
 * elsewhere must not act with the user's session cookie (cross-site request forgery). Browsers send
 * Origin with every POST, PUT, PATCH and DELETE; a request with neither header comes from a program
 * (the CLI, curl with a token), which a forged cross-site request cannot be.
 */
export function checkOrigin(req: Request): void {
  if (!STATE_CHANGING.has(req.method.toUpperCase())) return;
  const origin = req.headers.get('origin');
  const referer = req.headers.get('referer');
  let from: string | null = null;
  if (origin !== null) from = origin;
  else if (referer) {
    try {
      from = new URL(referer).origin;
    } catch {
      from = 'null';
    }
  }
  if (from === null) return;
  if (ownOrigins(req).has(from)) return;
  throw new AppError(
    'forbidden',
    `This request came from another site (${from === 'null' ? 'an unknown origin' : from}), so it was refused. Make the change from Quorum's own pages.`,
  );
}

function isJson(type: string): boolean {
  const base = type.split(';')[0]!.trim().toLowerCase();
  return base === 'application/json' || (base.startsWith('application/') && base.endsWith('+json'));
}

/** Reads at most `limit` bytes of the body; throws too_large (413) as soon as it is exceeded, without reading the rest. */
async function readCapped(req: Request, limit: number): Promise<string> {
  const tooLarge = () =>
    new AppError(
      'too_large',
      `The request body is larger than ${Math.round(limit / 1024)} KB. Send less at once (for long lists, split them).`,
    );
  const declared = Number(req.headers.get('content-length'));
  if (Number.isFinite(declared) && declared > limit) {
    await req.body?.cancel().catch(() => {});
    throw tooLarge();
  }
  if (!req.body) return '';
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => {});
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks).toString('utf8');
}

/**
 * The JSON body of a request, or {} when it has none. Only JSON is accepted (415 otherwise: form
 * posts are what a forged cross-site form sends), and at most `limit` bytes of it (413).
 */
export async function readJsonBody(req: Request, limit = MAX_JSON_BODY_BYTES): Promise<unknown> {
  const type = req.headers.get('content-type') ?? '';
  if (type && !isJson(type)) {
    await req.body?.cancel().catch(() => {});
    throw new AppError(
      'unsupported_media_type',
      `This address takes JSON (Content-Type: application/json), not ${type.split(';')[0]!.trim()}.`,
    );
  }
  const text = await readCapped(req, limit);
  if (!text.trim()) return {};
  if (!type) throw new AppError('unsupported_media_type', 'Send the request body as JSON (Content-Type: application/json).');
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError('bad_request', 'The request body is not valid JSON.');
  }
}
