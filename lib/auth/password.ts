import bcrypt from 'bcryptjs';

/** bcrypt cost factor 10 (2^10 rounds, the OWASP minimum; bcryptjs is pure JavaScript, ~0.1 s a hash here). */
const COST = 10;

/** Hashes a password with bcrypt (salted; the salt is part of the returned string). */
export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

/** Constant-time comparison of a password with a stored bcrypt hash. */
export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}
