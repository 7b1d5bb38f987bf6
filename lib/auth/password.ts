import bcrypt from 'bcryptjs';

/** bcrypt cost factor: 2^12 rounds, about 0.2 s per hash on this machine class. */
const COST = 12;

/** Hashes a password with bcrypt (salted; the salt is part of the returned string). */
export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

/** Constant-time comparison of a password with a stored bcrypt hash. */
export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}
