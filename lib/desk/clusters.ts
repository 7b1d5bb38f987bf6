/**
 * Clusters of one component map above the desk's |z| threshold, so the desk can move the crosshair
 * to the component's peak. A cluster is a set of supra-threshold voxels of one sign connected
 * through faces, edges or corners (26-connectivity, the face-, edge- and corner-neighbours of a
 * voxel; common practice, no source). Positive and negative voxels never join one cluster.
 *
 * Layout: `values` is one 3D frame in NIfTI order, x fastest: index = x + nx·(y + ny·z), read
 * through `at(i)` so that a frame of a 4D typed array is used without copying.
 */
export type Cluster = {
  /** Voxels in the cluster. */
  size: number;
  /** Voxel (x, y, z) of the cluster's largest |z|. */
  peak: [number, number, number];
  /** The value at the peak (signed z). */
  peakZ: number;
};

export type Sign = 'both' | 'positive' | 'negative';

/**
 * Clusters with |z| ≥ threshold (of the requested sign), largest first (ties: larger |peak| first),
 * at most `limit` of them. One pass marks the voxels that pass, then a flood fill with an explicit
 * stack; O(voxels).
 */
export function findClusters(
  at: (i: number) => number,
  dims: [number, number, number],
  threshold: number,
  { sign = 'both', limit = 50 }: { sign?: Sign; limit?: number } = {},
): Cluster[] {
  const [nx, ny, nz] = dims;
  const nxy = nx * ny;
  const n = nxy * nz;
  // one pass over the frame: 1 for a positive voxel that passes, -1 for a negative one, 0 otherwise
  const group = new Int8Array(n);
  for (let i = 0; i < n; i++) {
    const v = at(i);
    if (!Number.isFinite(v)) continue;
    const passes = sign === 'positive' ? v >= threshold : sign === 'negative' ? v <= -threshold : Math.abs(v) >= threshold;
    if (passes) group[i] = v > 0 ? 1 : -1;
  }
  const stack = new Int32Array(n);
  const out: Cluster[] = [];
  for (let start = 0; start < n; start++) {
    const g = group[start];
    if (g === 0) continue;
    group[start] = 0; // taken
    let top = 0;
    stack[top++] = start;
    let size = 0;
    let peakIdx = start;
    let peakAbs = Math.abs(at(start));
    while (top > 0) {
      const i = stack[--top];
      size++;
      const a = Math.abs(at(i));
      if (a > peakAbs) {
        peakAbs = a;
        peakIdx = i;
      }
      const z = Math.floor(i / nxy);
      const y = Math.floor((i - z * nxy) / nx);
      const x = i - z * nxy - y * nx;
      for (let dz = -1; dz <= 1; dz++) {
        const zz = z + dz;
        if (zz < 0 || zz >= nz) continue;
        for (let dy = -1; dy <= 1; dy++) {
          const yy = y + dy;
          if (yy < 0 || yy >= ny) continue;
          const row = nx * (yy + ny * zz);
          for (let dx = -1; dx <= 1; dx++) {
            const xx = x + dx;
            if (xx < 0 || xx >= nx) continue;
            const j = xx + row;
            if (group[j] !== g) continue;
            group[j] = 0;
            stack[top++] = j;
          }
        }
      }
    }
    const px = peakIdx % nx;
    const py = Math.floor(peakIdx / nx) % ny;
    const pz = Math.floor(peakIdx / (nx * ny));
    out.push({ size, peak: [px, py, pz], peakZ: at(peakIdx) });
  }
  out.sort((a, b) => b.size - a.size || Math.abs(b.peakZ) - Math.abs(a.peakZ));
  return out.slice(0, limit);
}

/** The largest |value| of a frame (null when it has no finite value). */
export function maxAbs(at: (i: number) => number, n: number): number | null {
  let m = -1;
  for (let i = 0; i < n; i++) {
    const a = Math.abs(at(i));
    if (a > m) m = a;
  }
  return m < 0 || !Number.isFinite(m) ? null : m;
}
