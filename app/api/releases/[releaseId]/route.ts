import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { changedSinceRelease } from '@/lib/db/queries/releases';
import { releaseFor } from '@/lib/releases/access';
import { publicManifest } from '@/lib/releases/create-release';

const params = z.object({ releaseId: z.coerce.number().int().positive() });

// GET /api/releases/:releaseId – one release with its manifest (files and checksums) and how many decisions changed since
export const GET = handler({ permission: 'releases.read', params, what: 'The release request' }, async ({ user, params }) => {
  const { release } = await releaseFor({ user, releaseId: params.releaseId });
  return { ...release, manifest: publicManifest(release.manifest!), changedSince: await changedSinceRelease({ releaseId: release.id }) };
});
