import 'server-only';
import { cache } from 'react';
import { getServerSession } from 'next-auth';
import { redirect } from 'next/navigation';
import { authOptions } from './options';
import { can, type Action } from './permissions';
import { findUserById, type UserRow } from '@/lib/db/queries/users';
import { forbidden, unauthenticated } from '@/lib/errors';

/**
 * The signed-in user, read fresh from the database on every request: a deactivated user or a
 * changed role takes effect at once, whatever the JWT still says.
 */
export const getCurrentUser = cache(async (): Promise<UserRow | null> => {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  const user = await findUserById({ id });
  return user && user.active ? user : null;
});

/** For route handlers and actions: the user, or an AppError (401 / 403). */
export async function requireUser(action?: Action): Promise<UserRow> {
  const user = await getCurrentUser();
  if (!user) throw unauthenticated();
  if (action && !can(user.role, action)) throw forbidden(`"${action}"`);
  return user;
}

/** For pages: the user, or a redirect to sign-in; a missing permission renders the refusal page. */
export async function requirePageUser(action?: Action): Promise<UserRow> {
  const user = await getCurrentUser();
  if (!user) redirect('/sign-in');
  if (action && !can(user.role, action)) redirect(`/forbidden?need=${encodeURIComponent(action)}`);
  return user;
}
