/**
 * The caller's network address, for throttling and the audit log. Forwarding headers can be set by
 * anyone, so they are believed only behind a reverse proxy the facility controls
 * (QUORUM_TRUST_PROXY=1: first X-Forwarded-For hop, else X-Real-IP). Without a proxy, the
 * production server (scripts/serve.ts) writes the connection's own peer address into
 * x-quorum-peer on every request, overwriting whatever the client sent, and sets
 * QUORUM_PEER_HEADER=1 in its own process; only then is that header believed. Anything else
 * (e.g. `next start` without a proxy) shares one address, 'direct', and only the per-account
 * throttles apply.
 */
type HeaderSource = Headers | Record<string, unknown> | undefined;

/** Longest address kept (45: an IPv4-mapped IPv6 address, the audit column's width); longer is not an address. */
const MAX_ADDRESS = 45;

function header(h: HeaderSource, name: string): string | null {
  if (!h) return null;
  if (h instanceof Headers) return h.get(name);
  const v = h[name];
  return typeof v === 'string' ? v : Array.isArray(v) ? String(v[0]) : null;
}

/** A plausible IPv4/IPv6 address (letters, digits, '.', ':', '%'), else null: never raw header text. */
function plausible(value: string | null | undefined): string | null {
  const v = value?.trim();
  if (!v || v.length > MAX_ADDRESS || !/^[0-9A-Za-z.:%_-]+$/.test(v)) return null;
  return v.startsWith('::ffff:') && v.includes('.') ? v.slice(7) : v;
}

export function clientAddress(source: Request | HeaderSource): string {
  const h = source instanceof Request ? source.headers : source;
  if (process.env.QUORUM_TRUST_PROXY === '1') {
    // only the first 1 KB is looked at: an over-long header is not worth splitting
    const forwarded = plausible(header(h, 'x-forwarded-for')?.slice(0, 1024).split(',')[0]);
    const real = plausible(header(h, 'x-real-ip'));
    if (forwarded || real) return (forwarded || real)!;
  }
  if (process.env.QUORUM_PEER_HEADER === '1') {
    const peer = plausible(header(h, 'x-quorum-peer'));
    if (peer) return peer;
  }
  return 'direct';
}

/** The address to write into the audit log, or null when it is not known. */
export function auditAddress(source: Request | HeaderSource): string | null {
  const a = clientAddress(source);
  return a === 'direct' ? null : a;
}

/**
 * A per-address throttle key such as `reset:ip:203.0.113.9`, or null when the address is not
 * known: a key shared by every caller would let one person lock everyone out, so without a
 * trusted proxy or the production server's peer address only the per-account and per-e-mail keys
 * throttle (one-time links carry 256 random bits and cannot be guessed anyway).
 */
export function addressKey<P extends string>(prefix: P, source: Request | HeaderSource): `${P}:${string}` | null {
  const a = clientAddress(source);
  return a === 'direct' ? null : `${prefix}:${a}`;
}
