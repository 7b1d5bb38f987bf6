// Grid, timing and head scale of each phantom size.
import type { PhantomSize } from './types';

export interface PhantomSizeSpec {
  dims: [number, number, number];
  /** mm */
  voxelSize: [number, number, number];
  volumes: number;
  trSeconds: number;
  /** Multiplies every head dimension (mm) so the head fits the field of view. */
  headScale: number;
}

/**
 * tiny: unit tests; small: the quick demo; XS: the realistic model's unit tests (4.5 × 4.5 × 5.5 mm,
 * ≈ 15k brain voxels, 5⅓ minutes); S/M: realistic 3 × 3 × 4 mm runs of 10 and 20 minutes;
 * L: a 2 mm standard-space-like grid, TR 1.5 s (a short-TR multiband-like acquisition).
 */
export const PHANTOM_SIZES: Record<PhantomSize, PhantomSizeSpec> = {
  tiny: { dims: [20, 24, 16], voxelSize: [8, 8, 9], volumes: 80, trSeconds: 2, headScale: 0.9 },
  small: { dims: [32, 32, 20], voxelSize: [6, 6, 7.5], volumes: 120, trSeconds: 2, headScale: 0.95 },
  XS: { dims: [40, 48, 30], voxelSize: [4.5, 4.5, 5.5], volumes: 160, trSeconds: 2, headScale: 0.97 },
  S: { dims: [64, 64, 36], voxelSize: [3, 3, 4], volumes: 300, trSeconds: 2, headScale: 0.99 },
  M: { dims: [64, 64, 36], voxelSize: [3, 3, 4], volumes: 600, trSeconds: 2, headScale: 0.99 },
  L: { dims: [91, 109, 91], voxelSize: [2, 2, 2], volumes: 400, trSeconds: 1.5, headScale: 1.03 },
};

export function sizeSpec(size: PhantomSize): PhantomSizeSpec {
  const spec = PHANTOM_SIZES[size];
  if (!spec) throw new Error(`Unknown phantom size "${String(size)}"; use tiny, small, XS, S, M or L.`);
  return spec;
}
