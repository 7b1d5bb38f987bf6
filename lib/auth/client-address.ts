/**
 * The caller's network address, for throttling and the audit log. Forwarding headers can be set by
 * anyone, so they are believed only behind a reverse proxy the facility controls
 * (QUORUM_TRUST_PROXY=1: first X-Forwarded-For hop, else X-Real-IP). Without it every caller
 * shares one address key, and the per-account throttle is what protects an account.
 */
type HeaderSource = Headers | Record<string, unknown> | undefined;

function header(h: HeaderSource, name: string): string | null {
  if (!h) return null;
  if (h instanceof Headers) return h.get(name);
  const v = h[name];
  return typeof v === 'string' ? v : Array.isArray(v) ? String(v[0]) : null;
}

export function clientAddress(source: Request | HeaderSource): string {
  const h = source instanceof Request ? source.headers : source;
  if (process.env.QUORUM_TRUST_PROXY === '1') {
    const forwarded = header(h, 'x-forwarded-for')?.split(',')[0]?.trim();
    const real = header(h, 'x-real-ip')?.trim();
    if (forwarded || real) return (forwarded || real)!.slice(0, 64);
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
 * trusted proxy only the per-account and per-e-mail keys throttle (one-time links carry 256
 * random bits and cannot be guessed anyway).
 */
export function addressKey<P extends string>(prefix: P, source: Request | HeaderSource): `${P}:${string}` | null {
  const a = clientAddress(source);
  return a === 'direct' ? null : `${prefix}:${a}`;
}
