/**
 * The Content-Security-Policy of pages, with a fresh nonce per request (proxy.ts). Next.js reads
 * the nonce from the request's CSP header and puts it on its own scripts; any other inline script
 * is refused. 'strict-dynamic' lets those scripts load the app's chunks. Styles stay
 * 'unsafe-inline' (React style attributes and the viewer set them; no script can run from a style).
 * Without a nonce (API responses, files: next.config.mjs) no inline script runs at all.
 * The viewer decodes images in blob: workers and reads maps through blob:/data: URLs.
 */
export function pageCsp(nonce: string | null, dev = process.env.NODE_ENV !== 'production'): string {
  const scripts = nonce ? `'self' 'nonce-${nonce}' 'strict-dynamic'` : "'self'";
  return [
    "default-src 'self'",
    `script-src ${scripts}${dev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self' blob: data:",
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join('; ');
}

/** 128 random bits, base64 (a CSP nonce must be unguessable and fresh for every response). */
export function newNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return btoa(String.fromCharCode(...bytes));
}
