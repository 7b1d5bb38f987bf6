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
 * at most `limit` of them. Single-pass flood fill with an explicit stack; O(voxels).
 */
export function findClusters(
  at: (i: number) => number,
  dims: [number, number, number],
  threshold: number,
  { sign = 'both', limit = 50 }: { sign?: Sign; limit?: number } = {},
): Cluster[] {
  const [nx, ny, nz] = dims;
  const n = nx * ny * nz;
  const seen = new Uint8Array(n);
  const stack = new Int32Array(n);
  const passes = (v: number) =>
    Number.isFinite(v) && (sign === 'positive' ? v >= threshold : sign === 'negative' ? v <= -threshold : Math.abs(v) >= threshold);
  const out: Cluster[] = [];
  for (let start = 0; start < n; start++) {
    if (seen[start]) continue;
    const v0 = at(start);
    if (!passes(v0)) continue;
    const positive = v0 > 0;
    seen[start] = 1;
    let top = 0;
    stack[top++] = start;
    let size = 0;
    let peakIdx = start;
    let peakAbs = Math.abs(v0);
    while (top > 0) {
      const i = stack[--top];
      size++;
      const a = Math.abs(at(i));
      if (a > peakAbs) {
        peakAbs = a;
        peakIdx = i;
      }
      const x = i % nx;
      const y = Math.floor(i / nx) % ny;
      const z = Math.floor(i / (nx * ny));
      for (let dz = -1; dz <= 1; dz++) {
        const zz = z + dz;
        if (zz < 0 || zz >= nz) continue;
        for (let dy = -1; dy <= 1; dy++) {
          const yy = y + dy;
          if (yy < 0 || yy >= ny) continue;
          for (let dx = -1; dx <= 1; dx++) {
            const xx = x + dx;
            if (xx < 0 || xx >= nx) continue;
            const j = xx + nx * (yy + ny * zz);
            if (seen[j]) continue;
            const v = at(j);
            if (!passes(v) || v > 0 !== positive) continue;
            seen[j] = 1;
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
