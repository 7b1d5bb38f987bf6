import 'server-only';
/**
 * The release ZIP, streamed: archiver reads each file from storage as it goes (no temporary copy
 * on disk or in memory) and writes manifest.json (with the sha256 of every other file, computed
 * at release time) last. Layout inside the ZIP, under one folder <study>_release-v<N>/:
 *   manifest.json, study-<id>_desc-… (raters, training set, agreement report JSON/CSV, methods)
 *   sub-<sub>/[ses-<ses>/]<run stem>_desc-… (per-run tables, sidecars, noise list, z-maps)
 */
import { ZipArchive } from 'archiver';
import type { ReleaseManifest, ReleaseRow } from '@/lib/db/queries/releases';
import { readStream } from '@/lib/storage';
import { publicManifest } from './create-release';

export function archiveRoot(release: Pick<ReleaseRow, 'studyId' | 'version' | 'runId'>, manifest: ReleaseManifest): string {
  const run = release.runId ? (manifest.runs.find((r) => r.runId === release.runId)?.stem ?? `run-${release.runId}`) : null;
  return `study-${release.studyId}${run ? `_${run}` : ''}_release-v${release.version}`;
}

export function archiveName(release: Pick<ReleaseRow, 'studyId' | 'version' | 'runId'>, manifest: ReleaseManifest): string {
  return `${archiveRoot(release, manifest)}.zip`;
}

/** A ZipArchive that streams the release's files; pipe it or wrap it with Readable.toWeb. */
export function releaseArchive(release: Pick<ReleaseRow, 'studyId' | 'version' | 'runId'>, manifest: ReleaseManifest): ZipArchive {
  const root = archiveRoot(release, manifest);
  const zip = new ZipArchive({ zlib: { level: 6 } });
  for (const f of manifest.files) {
    // already-compressed NIfTI is stored, not deflated again
    zip.append(readStream(f.key), { name: `${root}/${f.path}`, ...(f.name.endsWith('.gz') ? { store: true } : {}) });
  }
  zip.append(JSON.stringify(publicManifest(manifest), null, 2) + '\n', { name: `${root}/manifest.json` });
  void zip.finalize();
  return zip;
}
