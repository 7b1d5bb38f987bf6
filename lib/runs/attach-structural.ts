import 'server-only';
/**
 * PUT /api/runs/:id/structural — a lead attaches a structural image already on the run's grid
 * (one 3D volume, the run's dimensions and voxel-to-world transform), which the rating desk and the
 * read-only run view offer as an alternative underlay to the mean image. Nothing is resampled
 * here: an image on another grid is refused with what differs and what to do. At most
 * MAX_STRUCTURAL_BYTES as sent and as described by its header; stored gzipped under a server key.
 */
import { readFile, rm, writeFile } from 'node:fs/promises';
import { gzipSync } from 'node:zlib';
import { affineMaxDiff, readNiftiHeaderFile, type NiftiHeader } from '@/lib/nifti';
import { ensureDirFor, moveIntoStore, newKey, pathFor, removeKey } from '@/lib/storage';
import { AppError } from '@/lib/errors';
import { inTransaction } from '@/lib/db/transaction';
import { recordAudit } from '@/lib/db/queries/audit';
import { setRunStructural } from '@/lib/db/queries/structural';
import type { UserRow } from '@/lib/db/queries/users';
import { receiveNifti } from './receive';
import { runForChange, type RawBody } from './upload';
import { MAX_STRUCTURAL_BYTES, formatBytes } from './schema';

const fmtDims = (h: NiftiHeader) => [0, 1, 2].map((i) => h.dims[i] ?? 1).join(' × ');

/** Refuses a structural image that is not one 3D volume on the run's grid, saying what differs. */
export function checkStructuralGrid(run: NiftiHeader, image: NiftiHeader, tol = 1e-3): void {
  const volumes = image.dims.length >= 4 ? image.dims.slice(3).reduce((a, b) => a * (b || 1), 1) : 1;
  if (volumes > 1) {
    throw new AppError(
      'validation',
      `The structural image holds ${volumes} volumes; the underlay is one 3D volume. Upload a single 3D image.`,
      { file: ['Not 3D.'] },
    );
  }
  if ([0, 1, 2].some((i) => (run.dims[i] ?? 1) !== (image.dims[i] ?? 1))) {
    throw new AppError(
      'validation',
      `The structural image is ${fmtDims(image)} voxels; this run's grid is ${fmtDims(run)}. Resample the structural image to the run's grid (same dimensions and voxel-to-world transform) and upload it again.`,
      { file: ["Not on the run's grid."] },
    );
  }
  const diff = affineMaxDiff(run.affine, image.affine);
  if (!(diff <= tol)) {
    throw new AppError(
      'validation',
      `The structural image has the run's dimensions but another voxel-to-world transform (largest difference ${diff.toPrecision(3)} mm). Resample it to the run's grid and upload it again.`,
      { file: ["Not on the run's grid."] },
    );
  }
}

export async function attachStructural({
  user,
  runId,
  name,
  raw,
}: {
  user: Pick<UserRow, 'id' | 'role'>;
  runId: number;
  name: string;
  raw: RawBody;
}): Promise<{ structuralName: string }> {
  const run = await runForChange(user, runId);
  const runHeader = await readNiftiHeaderFile(pathFor(run.fileKey));
  const received = await receiveNifti(raw.body, {
    maxBytes: MAX_STRUCTURAL_BYTES,
    maxImageBytes: MAX_STRUCTURAL_BYTES,
    contentLength: raw.contentLength,
    signal: raw.signal,
    what: 'structural image',
    checkHeader: (h) => checkStructuralGrid(runHeader, h),
  }).catch((err: unknown) => {
    if (err instanceof AppError && err.code === 'too_large') {
      throw new AppError(
        'too_large',
        `The structural image is larger than the limit of ${formatBytes(MAX_STRUCTURAL_BYTES)}. An image on the run's grid is one volume of a few MB: check that you chose the structural image resampled to the run, not the original.`,
      );
    }
    throw err;
  });
  const key = newKey('structural', '.nii.gz');
  let previous: string | null = null;
  try {
    if (received.gzip) await moveIntoStore(received.tempFile, key);
    else {
      // stored gzipped so the viewer always reads one kind of file (a 3D image on a functional grid is small)
      await writeFile(await ensureDirFor(key), gzipSync(await readFile(received.tempFile), { level: 6 }));
      await rm(received.tempFile, { force: true });
    }
    previous = await inTransaction(async (trx) => {
      const before = await setRunStructural({ runId, key, name }, trx);
      await recordAudit(
        {
          actorId: user.id,
          action: 'run.structural',
          targetType: 'run',
          targetId: runId,
          studyId: run.studyId,
          detail: { name, bytes: received.sizeBytes },
        },
        trx,
      );
      return before;
    });
  } catch (err) {
    await rm(received.tempFile, { force: true });
    await removeKey(key);
    throw err;
  }
  await removeKey(previous).catch(() => undefined);
  return { structuralName: name };
}
