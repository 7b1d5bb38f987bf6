/** The JWT signing secret: NEXTAUTH_SECRET, or a fixed development value outside production. */
export function authSecret(): string {
  const secret = process.env.NEXTAUTH_SECRET;
  if (secret) return secret;
  // `next build` renders nothing signed in; it only needs a value to get past the configuration.
  if (process.env.NEXT_PHASE === 'phase-production-build') return 'build-time-placeholder';
  if (process.env.NODE_ENV === 'production' && process.env.QUORUM_ALLOW_DEV_SECRET !== '1') {
    throw new Error('NEXTAUTH_SECRET is not set. Set it to a long random string (e.g. `openssl rand -hex 32`).');
  }
  return 'quorum-development-secret-not-for-production';
}
