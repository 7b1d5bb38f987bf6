import 'server-only';
import { cache } from 'react';
import { getServerSession } from 'next-auth';
import { forbidden as refusePage, redirect } from 'next/navigation';
import { authOptions } from './options';
import { can, type Action } from './permissions';
import type { UserRow } from '@/lib/db/queries/users';
import { findSessionUser } from '@/lib/db/queries/sessions';
import { forbidden, unauthenticated } from '@/lib/errors';

/**
 * The signed-in user, read fresh from the database on every request: a deactivated user or a
 * changed role takes effect at once, whatever the JWT still says. The session must still be
 * live: its token's session version equals the account's (password change or reset, deactivation
 * and "sign out everywhere" raise it) and its id was not signed out (ended_sessions).
 */
export const getCurrentUser = cache(async (): Promise<UserRow | null> => {
  const session = await getServerSession(authOptions);
  const { id, sid, sv } = session?.user ?? {};
  if (!id || !sid || typeof sv !== 'number' || sv < 0) return null;
  return findSessionUser({ id, sid, sv });
});

/** For route handlers and actions: the user, or an AppError (401 / 403). */
export async function requireUser(action?: Action): Promise<UserRow> {
  const user = await getCurrentUser();
  if (!user) throw unauthenticated();
  if (action && !can(user.role, action)) throw forbidden(`"${action}"`);
  return user;
}

/** For pages: the user, or a redirect to sign-in; a missing permission renders app/forbidden.tsx with 403. */
export async function requirePageUser(action?: Action): Promise<UserRow> {
  const user = await getCurrentUser();
  if (!user) redirect('/sign-in');
  if (action && !can(user.role, action)) refusePage();
  return user;
}
