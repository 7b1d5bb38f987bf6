import { z } from 'zod';
import { handler } from '@/lib/api/handler';
import { changedSinceRelease } from '@/lib/db/queries/releases';
import { publicManifest } from '@/lib/releases/create-release';
import { releaseDenoisedFiles } from '@/lib/releases/denoised-files';

const params = z.object({ releaseId: z.coerce.number().int().positive() });

// GET /api/releases/:releaseId – one release with its manifest (files and checksums), the denoised files made from it, and how many decisions changed since
export const GET = handler({ permission: 'releases.read', scope: 'release', params, what: 'The release request' }, async ({ access }) => {
  const release = access.release!;
  const denoised = (await releaseDenoisedFiles({ releaseId: release.id, runs: release.manifest!.runs })).map(({ key: _key, ...f }) => ({
    ...f,
    url: `/api/releases/${release.id}/files/${encodeURIComponent(f.name)}`,
  }));
  return {
    ...release,
    manifest: publicManifest(release.manifest!),
    denoised,
    changedSince: await changedSinceRelease({ releaseId: release.id }),
  };
});
