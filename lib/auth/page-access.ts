import 'server-only';
import { forbidden, notFound } from 'next/navigation';
import { leadsStudy, type Action } from './permissions';
import type { Access } from '@/lib/vocabulary/roles';
import { requirePageUser } from './session';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { UserRow } from '@/lib/db/queries/users';

/**
 * The pages' counterpart of the route handler's `scope: 'study'`: the signed-in user with the page's
 * permission (else sign-in / 403), and their Access to the study in the address (404 when it is not a
 * positive integer or not theirs to see). With `studyRule: 'lead'` only the study's leads and admins
 * get through; the others see the 403 page.
 */
export async function studyPageAccess(
  action: Action,
  rawId: string,
  { studyRule = 'member' }: { studyRule?: 'member' | 'lead' } = {},
): Promise<{ user: UserRow; access: Access }> {
  const user = await requirePageUser(action);
  const studyId = Number(rawId);
  const access = Number.isInteger(studyId) && studyId > 0 ? await findStudyAccess({ user, studyId }) : null;
  if (!access) notFound();
  if (studyRule === 'lead' && !leadsStudy(access)) forbidden();
  return { user, access };
}
