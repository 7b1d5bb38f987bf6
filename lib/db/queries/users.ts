import 'server-only';
import { db } from '@/lib/db/knex';
import type { Role } from '@/lib/vocabulary/roles';

export type UserRow = {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  lastSignInAt: Date | null;
  createdAt: Date;
};

/** The columns of a UserRow (never the password hash). */
export const publicColumns = [
  'id',
  'email',
  'name',
  'role',
  'active',
  'last_sign_in_at as lastSignInAt',
  'created_at as createdAt',
] as const;

export function normalise(row: Record<string, unknown> | undefined): UserRow | null {
  if (!row) return null;
  return { ...(row as unknown as UserRow), active: Boolean(row.active) };
}

/** A user without the password hash, or null. */
export async function findUserById({ id }: { id: number }): Promise<UserRow | null> {
  return normalise(await db('users').select(publicColumns).where({ id }).first());
}

/** The user and the password hash, for sign-in and password change only. */
export async function findCredentialsByEmail({ email }: { email: string }) {
  const row = await db('users')
    .select([...publicColumns, 'password_hash as passwordHash'])
    .where({ email: email.trim().toLowerCase() })
    .first();
  if (!row) return null;
  return { user: normalise(row) as UserRow, passwordHash: row.passwordHash as string | null };
}

export async function findPasswordHash({ id }: { id: number }): Promise<string | null> {
  const row = await db('users').select('password_hash as passwordHash').where({ id }).first();
  return (row?.passwordHash as string | undefined) ?? null;
}

export async function recordSignIn({ id }: { id: number }): Promise<void> {
  await db('users')
    .where({ id })
    .update({ last_sign_in_at: db.fn.now(3) });
}

/** Sets a new password and ends every session of the user; returns the new session version. */
export async function updatePasswordHash({ id, passwordHash }: { id: number; passwordHash: string }): Promise<number> {
  await db('users')
    .where({ id })
    .update({ password_hash: passwordHash, session_version: db.raw('session_version + 1'), updated_at: db.fn.now(3) });
  const row = await db('users').where({ id }).first('session_version');
  return Number(row?.session_version ?? 0);
}

export async function listUsers(): Promise<UserRow[]> {
  const rows = await db('users').select(publicColumns).orderBy('name');
  return rows.map((r) => normalise(r) as UserRow);
}

/** The id and account role of the active account with this e-mail (trimmed, lower-cased), or null. */
export async function findActiveUserByEmail({ email }: { email: string }): Promise<{ id: number; role: Role } | null> {
  const row = await db('users').where({ email: email.trim().toLowerCase(), active: true }).first('id', 'role');
  return row ? { id: Number(row.id), role: row.role as Role } : null;
}
