// Automatic brain mask from the temporal mean image of a run (DESIGN.md §4 step 1), used when the
// lead uploads no mask of their own.

import { labelComponents, volumeSize } from './connected-components';

/** Raised when no sensible mask can be made; the message says what to do instead. */
export class BrainMaskError extends Error {
  readonly code: 'bad_input' | 'empty_image' | 'empty_mask';

  constructor(code: BrainMaskError['code'], message: string) {
    super(message);
    this.name = 'BrainMaskError';
    this.code = code;
  }
}

/** Default fraction of the robust high intensity (98th percentile) used as the threshold. */
export const DEFAULT_MASK_THRESHOLD_FRACTION = 0.2;

/**
 * Automatic brain mask from the temporal mean image.
 *
 * 1. Robust threshold: t = thresholdFraction × P98, where P98 is the 98th percentile (linear
 *    interpolation between order statistics, as numpy.percentile's default) of the finite,
 *    strictly positive voxels. Taking a high percentile rather than the maximum keeps a few very
 *    bright voxels (vessels, eyes, spikes) from raising the threshold. The default fraction 0.2 is
 *    our own choice: EPI background is typically a few percent of tissue intensity (common
 *    practice, no source). Voxels with mean > t are candidates.
 * 2. Keep the largest 6-connected candidate component (detached bright blobs such as eyes or
 *    scalp fat are dropped).
 * 3. Fill holes: first 3D (6-connected background regions that do not reach the volume border),
 *    then per axial slice (4-connected in-plane background regions that do not reach the slice
 *    border), so dark interior patches (dropout, ventricle partial volume) are kept in the mask.
 *
 * Layout: `mean` is a full volume, index x + nx·(y + ny·z) (x fastest); intensities in the
 * image's own units. Returns a Uint8Array of the same layout, 1 = brain.
 */
export function autoBrainMask(mean: Float32Array, dims: [number, number, number], opts: { thresholdFraction?: number } = {}): Uint8Array {
  const n = volumeSize(dims);
  if (mean.length !== n) {
    throw new BrainMaskError(
      'bad_input',
      `Mean image has ${mean.length} voxels but dims [${dims.join(', ')}] describe ${n}; pass the mean image of this run's grid.`,
    );
  }
  const fraction = opts.thresholdFraction ?? DEFAULT_MASK_THRESHOLD_FRACTION;
  if (!Number.isFinite(fraction) || fraction <= 0 || fraction >= 1) {
    throw new BrainMaskError(
      'bad_input',
      `thresholdFraction must lie strictly between 0 and 1, got ${fraction}; the default is ${DEFAULT_MASK_THRESHOLD_FRACTION}.`,
    );
  }

  const positive: number[] = [];
  for (let i = 0; i < n; i++) {
    const v = mean[i];
    if (Number.isFinite(v) && v > 0) positive.push(v);
  }
  if (positive.length === 0) {
    throw new BrainMaskError(
      'empty_image',
      'The mean image has no positive voxels, so no brain mask can be estimated; check the scaling of the run or upload a brain mask.',
    );
  }
  const sorted = Float64Array.from(positive).sort();
  const threshold = fraction * percentileSorted(sorted, 98);

  const candidate = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const v = mean[i];
    if (Number.isFinite(v) && v > threshold) candidate[i] = 1;
  }
  const { labels, sizes } = labelComponents(candidate, dims, 6);
  if (sizes.length === 0) {
    throw new BrainMaskError('empty_mask', 'No voxel lies above the automatic threshold; lower thresholdFraction or upload a brain mask.');
  }
  let best = 0;
  for (let l = 1; l < sizes.length; l++) if (sizes[l] > sizes[best]) best = l;
  const keep = best + 1;
  const mask = new Uint8Array(n);
  for (let i = 0; i < n; i++) if (labels[i] === keep) mask[i] = 1;

  fillHoles3d(mask, dims);
  fillHolesPerSlice(mask, dims);
  return mask;
}

/**
 * Percentile p (0..100) of an ascending array by linear interpolation between order statistics
 * (numpy.percentile's default 'linear' method). Unitless; same units as the data.
 */
export function percentileSorted(sorted: Float64Array, p: number): number {
  if (sorted.length === 0) return Number.NaN;
  const pos = (p / 100) * (sorted.length - 1);
  const lo = Math.floor(pos);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (pos - lo) * (sorted[hi] - sorted[lo]);
}

/** Sets to 1 every 6-connected background region of `mask` that does not touch the grid border. */
function fillHoles3d(mask: Uint8Array, dims: [number, number, number]): void {
  const [nx, ny, nz] = dims;
  const background = new Uint8Array(mask.length);
  for (let i = 0; i < mask.length; i++) background[i] = mask[i] === 0 ? 1 : 0;
  const { labels, sizes } = labelComponents(background, dims, 6);
  const touches = new Uint8Array(sizes.length + 1);
  for (let z = 0; z < nz; z++) {
    for (let y = 0; y < ny; y++) {
      for (let x = 0; x < nx; x++) {
        if (x > 0 && y > 0 && z > 0 && x < nx - 1 && y < ny - 1 && z < nz - 1) continue;
        touches[labels[x + nx * (y + ny * z)]] = 1;
      }
    }
  }
  for (let i = 0; i < mask.length; i++) {
    const l = labels[i];
    if (l !== 0 && touches[l] === 0) mask[i] = 1;
  }
}

/** Per axial (z) slice, sets to 1 every 4-connected in-plane background region not touching the slice border. */
function fillHolesPerSlice(mask: Uint8Array, dims: [number, number, number]): void {
  const [nx, ny, nz] = dims;
  const nxy = nx * ny;
  const outside = new Uint8Array(nxy);
  const queue = new Int32Array(nxy);
  for (let z = 0; z < nz; z++) {
    const base = z * nxy;
    outside.fill(0);
    let head = 0;
    let tail = 0;
    const seed = (x: number, y: number): void => {
      const j = x + nx * y;
      if (mask[base + j] === 0 && outside[j] === 0) {
        outside[j] = 1;
        queue[tail++] = j;
      }
    };
    for (let x = 0; x < nx; x++) {
      seed(x, 0);
      seed(x, ny - 1);
    }
    for (let y = 0; y < ny; y++) {
      seed(0, y);
      seed(nx - 1, y);
    }
    while (head < tail) {
      const j = queue[head++];
      const y = Math.floor(j / nx);
      const x = j - y * nx;
      if (x > 0) seed(x - 1, y);
      if (x < nx - 1) seed(x + 1, y);
      if (y > 0) seed(x, y - 1);
      if (y < ny - 1) seed(x, y + 1);
    }
    for (let j = 0; j < nxy; j++) if (outside[j] === 0) mask[base + j] = 1;
  }
}
