import 'server-only';
/**
 * What the pipeline API calls "the latest release" of a run: the newest release that contains the
 * run, whichever its scope. A study release covers each of its runs; a single-run release made
 * after it supersedes it for that run only; a later study release supersedes both. "Newest" is
 * the later release (higher release id; ids grow in the order releases are made).
 */
import { listReleases, type ManifestRun, type ReleaseManifest, type ReleaseRow } from '@/lib/db/queries/releases';
import { releaseDenoisedFiles } from './denoised-files';

export type EntityFilter = { sub?: string; ses?: string; task?: string; acq?: string; run?: string };
type FileEntry = { url: string; sha256: string; bytes: number };

export type LatestRun = {
  runId: number;
  name: string;
  entities: ManifestRun['entities'];
  k: number;
  noise: number[];
  release: { id: number; version: number; scope: 'study' | 'run'; releasedAt: string };
  files: Record<string, FileEntry>;
  denoised: (FileEntry & { name: string; mode: 'partial' | 'full'; includeMotion: boolean })[];
};

const matches = (r: ManifestRun, q: EntityFilter) =>
  (!q.sub || r.entities.sub === q.sub) &&
  (!q.ses || r.entities.ses === q.ses) &&
  (!q.task || r.entities.task === q.task) &&
  (!q.acq || r.entities.acq === q.acq) &&
  (!q.run || r.entities.run === q.run);

/** Per run of the study (filtered by entities), its latest release's entry and file addresses; `studyRelease` is the newest study release. */
export async function latestReleasedRuns({
  studyId,
  filter,
  origin,
}: {
  studyId: number;
  filter: EntityFilter;
  origin: string;
}): Promise<{ any: boolean; studyRelease: ReleaseRow | null; manifest: ReleaseManifest | null; runs: LatestRun[] }> {
  const releases = (await listReleases({ studyId })).filter((r) => r.manifest).sort((a, b) => b.id - a.id);
  const latestOf = new Map<number, { release: ReleaseRow; run: ManifestRun }>();
  for (const release of releases)
    for (const run of release.manifest!.runs) if (!latestOf.has(run.runId)) latestOf.set(run.runId, { release, run });

  const url = (releaseId: number, name: string) => `${origin}/api/v1/releases/${releaseId}/files/${encodeURIComponent(name)}`;
  const runs: LatestRun[] = [];
  const entries = [...latestOf.values()]
    .filter((e) => matches(e.run, filter))
    .sort((a, b) => a.run.stem.localeCompare(b.run.stem) || a.run.runId - b.run.runId);
  for (const { release, run } of entries) {
    const m = release.manifest!;
    const denoised = (await releaseDenoisedFiles({ releaseId: release.id, runs: [run] })).map((f) => ({
      name: f.name,
      mode: f.mode,
      includeMotion: f.includeMotion,
      url: url(release.id, f.name),
      sha256: f.sha256,
      bytes: f.bytes,
    }));
    runs.push({
      runId: run.runId,
      name: run.stem,
      entities: run.entities,
      k: run.k,
      noise: run.noise,
      release: {
        id: release.id,
        version: release.version,
        scope: release.runId == null ? 'study' : 'run',
        releasedAt: m.release.releasedAt,
      },
      files: Object.fromEntries([
        ...m.files
          .filter((f) => f.runId === run.runId)
          .map((f) => [f.name, { url: url(release.id, f.name), sha256: f.sha256, bytes: f.bytes }] as const),
        ...denoised.map((f) => [f.name, { url: f.url, sha256: f.sha256, bytes: f.bytes }] as const),
      ]),
      denoised,
    });
  }
  const studyRelease = releases.find((r) => r.runId == null) ?? null;
  return { any: releases.length > 0, studyRelease, manifest: studyRelease?.manifest ?? releases[0]?.manifest ?? null, runs };
}
