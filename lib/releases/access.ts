import 'server-only';
/** Scoping for releases: a release is visible only to those who may see its study. */
import { findRelease, type ReleaseRow } from '@/lib/db/queries/releases';
import { findStudyAccess } from '@/lib/db/queries/study-access';
import type { Access } from '@/lib/vocabulary/roles';
import type { UserRow } from '@/lib/db/queries/users';
import { notFound } from '@/lib/errors';

/** The release and the caller's access to its study; 404 when either is out of reach (no existence leak). */
export async function releaseFor({
  user,
  releaseId,
}: {
  user: Pick<UserRow, 'id' | 'role'>;
  releaseId: number;
}): Promise<{ release: ReleaseRow; access: Access }> {
  const release = await findRelease({ releaseId });
  const access = release ? await findStudyAccess({ user, studyId: release.studyId }) : null;
  if (!release || !access || !release.manifest) throw notFound('The release');
  return { release, access };
}
