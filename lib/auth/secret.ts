/** Secrets that were ever written down in this repository or its docs; never good enough. */
const KNOWN_WEAK = new Set(['quorum-development-secret-not-for-production', 'build-time-placeholder', 'changeme', 'secret']);

/** Shortest accepted production secret: 32 characters (e.g. `openssl rand -hex 32` gives 64). */
export const MIN_SECRET_LENGTH = 32;

/**
 * What is wrong with NEXTAUTH_SECRET for a production server, or null when it is usable: missing,
 * shorter than MIN_SECRET_LENGTH, one character repeated, or a value known from this repository.
 */
export function secretProblem(env: Record<string, string | undefined> = process.env): string | null {
  const secret = env.NEXTAUTH_SECRET;
  if (!secret) return 'NEXTAUTH_SECRET is not set. Set it to a long random string (e.g. `openssl rand -hex 32`).';
  if (KNOWN_WEAK.has(secret) || /^(.)\1*$/.test(secret)) {
    return 'NEXTAUTH_SECRET is a well-known or trivial value. Set it to a long random string (e.g. `openssl rand -hex 32`).';
  }
  if (secret.length < MIN_SECRET_LENGTH) {
    return `NEXTAUTH_SECRET is ${secret.length} characters long; use at least ${MIN_SECRET_LENGTH} random characters (e.g. \`openssl rand -hex 32\`).`;
  }
  return null;
}

/** The JWT signing secret: NEXTAUTH_SECRET, or a fixed development value outside production. */
export function authSecret(): string {
  // `next build` renders nothing signed in; it only needs a value to get past the configuration.
  if (process.env.NEXT_PHASE === 'phase-production-build') return process.env.NEXTAUTH_SECRET || 'build-time-placeholder';
  if (process.env.NODE_ENV === 'production' && process.env.QUORUM_ALLOW_DEV_SECRET !== '1') {
    const problem = secretProblem();
    if (problem) throw new Error(problem);
  }
  return process.env.NEXTAUTH_SECRET || 'quorum-development-secret-not-for-production';
}
