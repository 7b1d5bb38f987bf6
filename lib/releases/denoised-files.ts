import 'server-only';
/**
 * Denoised images made from a release's noise lists. They are written after the release (a lead
 * asks for them on the release page), so they are not in its frozen manifest; they are listed and
 * served beside it. One file per name: of two requests that made the same file name, the newest.
 */
import { listReleaseDenoised } from '@/lib/db/queries/exports';
import type { ManifestRun } from '@/lib/db/queries/releases';

export type DenoisedFile = {
  name: string;
  runId: number;
  key: string;
  sha256: string;
  bytes: number;
  mode: 'partial' | 'full';
  includeMotion: boolean;
  noise: number[];
};

/** The release's denoised files, one per name, only for runs the release contains. */
export async function releaseDenoisedFiles({
  releaseId,
  runs,
}: {
  releaseId: number;
  runs: Pick<ManifestRun, 'runId'>[];
}): Promise<DenoisedFile[]> {
  const inRelease = new Set(runs.map((r) => r.runId));
  const byName = new Map<string, DenoisedFile>();
  for (const job of await listReleaseDenoised({ releaseId })) {
    const r = job.result!;
    if (!inRelease.has(job.runId) || byName.has(r.name)) continue;
    byName.set(r.name, {
      name: r.name,
      runId: job.runId,
      key: r.key,
      sha256: r.sha256,
      bytes: r.bytes,
      mode: r.mode,
      includeMotion: r.includeMotion,
      noise: r.noise,
    });
  }
  return [...byName.values()];
}
