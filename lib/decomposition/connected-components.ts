// 3D connected-component labelling of a boolean volume. Used by the automatic brain mask and by
// the cluster features of a component map.

/** Raised when the volume and its dimensions disagree or an option is out of range. */
export class ConnectedComponentsError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ConnectedComponentsError';
  }
}

/** Checks dims are three positive integers and returns nx·ny·nz. */
export function volumeSize(dims: [number, number, number]): number {
  if (dims.length !== 3 || dims.some((d) => !Number.isInteger(d) || d < 1)) {
    throw new ConnectedComponentsError(
      `Volume dimensions must be three positive integers, got [${dims.join(', ')}]; pass the x, y, z sizes of the grid.`,
    );
  }
  return dims[0] * dims[1] * dims[2];
}

/**
 * Labels the connected components of the non-zero voxels of `mask` by breadth-first flood fill.
 *
 * Layout: `mask` is a full volume, linear index i = x + nx·(y + ny·z) (x fastest). Connectivity 6
 * joins voxels sharing a face; 26 also joins voxels sharing an edge or a corner (standard digital
 * topology definitions; common practice, no source). Voxels outside the grid count as background.
 *
 * Returns `labels` (same layout; 0 = background, 1..n = component, numbered in scan order of each
 * component's first voxel) and `sizes`, where `sizes[l - 1]` is the voxel count of label l, so
 * `sizes.length` is the number of components.
 */
export function labelComponents(
  mask: Uint8Array,
  dims: [number, number, number],
  connectivity: 6 | 26 = 6,
): { labels: Int32Array; sizes: number[] } {
  const n = volumeSize(dims);
  if (mask.length !== n) {
    throw new ConnectedComponentsError(
      `Mask has ${mask.length} voxels but dims [${dims.join(', ')}] describe ${n}; pass the mask of the same grid.`,
    );
  }
  if (connectivity !== 6 && connectivity !== 26) {
    throw new ConnectedComponentsError(`Connectivity must be 6 or 26, got ${String(connectivity)}.`);
  }
  const [nx, ny, nz] = dims;
  const nxy = nx * ny;
  const offsets = neighbourOffsets(connectivity);
  const labels = new Int32Array(n);
  const sizes: number[] = [];
  const queue = new Int32Array(n);

  for (let seed = 0; seed < n; seed++) {
    if (mask[seed] === 0 || labels[seed] !== 0) continue;
    const label = sizes.length + 1;
    labels[seed] = label;
    let head = 0;
    let tail = 0;
    queue[tail++] = seed;
    while (head < tail) {
      const i = queue[head++];
      const z = Math.floor(i / nxy);
      const rem = i - z * nxy;
      const y = Math.floor(rem / nx);
      const x = rem - y * nx;
      for (let k = 0; k < offsets.length; k += 3) {
        const xx = x + offsets[k];
        const yy = y + offsets[k + 1];
        const zz = z + offsets[k + 2];
        if (xx < 0 || yy < 0 || zz < 0 || xx >= nx || yy >= ny || zz >= nz) continue;
        const j = xx + nx * (yy + ny * zz);
        if (mask[j] !== 0 && labels[j] === 0) {
          labels[j] = label;
          queue[tail++] = j;
        }
      }
    }
    sizes.push(tail);
  }
  return { labels, sizes };
}

/** Flat [dx, dy, dz, dx, dy, dz, …] neighbour offsets for 6- or 26-connectivity. */
function neighbourOffsets(connectivity: 6 | 26): Int32Array {
  const out: number[] = [];
  for (let dz = -1; dz <= 1; dz++) {
    for (let dy = -1; dy <= 1; dy++) {
      for (let dx = -1; dx <= 1; dx++) {
        const manhattan = Math.abs(dx) + Math.abs(dy) + Math.abs(dz);
        if (manhattan === 0) continue;
        if (connectivity === 6 && manhattan !== 1) continue;
        out.push(dx, dy, dz);
      }
    }
  }
  return Int32Array.from(out);
}
