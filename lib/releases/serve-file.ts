import 'server-only';
/** Streams one file of a release (by its file name in the manifest, or a denoised image made from it) after the caller's checks. */
import type { ReleaseRow } from '@/lib/db/queries/releases';
import { notFound } from '@/lib/errors';
import { storedFileResponse } from '@/lib/storage/respond';
import { releaseDenoisedFiles } from './denoised-files';

export async function releaseFileResponse(release: ReleaseRow, name: string): Promise<Response> {
  const file =
    release.manifest?.files.find((f) => f.name === name) ??
    (await releaseDenoisedFiles({ releaseId: release.id, runs: release.manifest?.runs ?? [] })).find((f) => f.name === name);
  if (!file) throw notFound(`The file "${name}" in release ${release.id}`);
  return storedFileResponse(file.key, {
    name,
    download: true,
    sha256: file.sha256,
    missing: `The stored copy of "${name}" was not found.`,
  });
}
