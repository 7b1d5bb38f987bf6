// Checks on image geometry used before decomposition (4D run, mask on the run's grid).
import { affineMaxDiff } from './affine';
import { NiftiError } from './errors';
import type { NiftiHeader } from './header';

/** Throws not_4d unless the header describes a 4D image with at least minVolumes volumes. */
export function assertFourD(header: NiftiHeader, minVolumes = 2): void {
  const nt = header.dims.length >= 4 ? header.dims[3] : 1;
  if (header.dims.length < 4 || nt === 1) {
    throw new NiftiError(
      'not_4d',
      `The image is 3D (${header.dims.slice(0, 3).join(' × ')}) where a 4D fMRI run is needed. Upload the whole time series, not a single volume.`,
    );
  }
  if (nt < minVolumes) {
    throw new NiftiError(
      'not_4d',
      `The run has too few volumes: ${nt}, but at least ${minVolumes} are needed. Upload a longer run or drop fewer initial volumes.`,
    );
  }
}

/**
 * Throws grid_mismatch unless a and b share the spatial grid: equal nx, ny, nz and voxel→world
 * affines equal within `tol` (mm) element-wise. Used for a mask against its run.
 */
export function assertSameGrid(a: NiftiHeader, b: NiftiHeader, tol = 1e-3): void {
  const sa = [0, 1, 2].map((i) => a.dims[i] ?? 1);
  const sb = [0, 1, 2].map((i) => b.dims[i] ?? 1);
  if (sa.some((d, i) => d !== sb[i])) {
    throw new NiftiError(
      'grid_mismatch',
      `The images are on different grids: ${sa.join(' × ')} voxels versus ${sb.join(' × ')}. Resample the mask to the run's grid.`,
    );
  }
  const diff = affineMaxDiff(a.affine, b.affine);
  if (!(diff <= tol)) {
    throw new NiftiError(
      'grid_mismatch',
      `The images have the same size but different voxel-to-world transforms (largest difference ${diff.toPrecision(3)}). Resample the mask to the run's grid.`,
    );
  }
}
