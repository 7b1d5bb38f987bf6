/**
 * The desk's map payload on disk (see map-payload.ts): one file beside the decomposition's
 * components file (`<components key>.deskmaps`), written when the decomposition is stored, or on
 * the first request for an older one. The file is the layout message followed by one maps message
 * holding all k maps, so any range of maps is read with two small positioned reads.
 */
import { open, rename, rm, stat } from 'node:fs/promises';
import { encodeNifti1, readNiftiFile, spatialFieldsOf, type NiftiHeader } from '@/lib/nifti';
import { pathFor } from '@/lib/storage';
import { encodeLayout, encodeMaps, mapsByteLength, maskIndices, quantiseMap, type MapLayout } from './map-payload';

/** The storage key of a decomposition's desk maps. */
export const deskMapsKey = (componentsKey: string) => `${componentsKey}.deskmaps`;

/** Maps per request at most (≈ 90 KB each for a 45k-voxel mask). */
export const MAX_MAPS_PER_REQUEST = 16;

type Grid = Pick<NiftiHeader, 'pixdim' | 'affine' | 'qform' | 'qformCode' | 'sformCode' | 'xyztUnits'>;

/** A 352-byte NIfTI-1 header for one float32 volume on the components' grid (same transforms). */
function headerTemplate(dims: [number, number, number], grid: Grid): Uint8Array {
  const [nx, ny, nz] = dims;
  const bytes = encodeNifti1({
    dims: [nx, ny, nz],
    pixdim: grid.pixdim.slice(1, 4),
    ...spatialFieldsOf(grid),
    xyztUnits: grid.xyztUnits,
    datatype: 'float32',
    data: new Float32Array(nx * ny * nz),
    description: 'Quorum component z-maps (desk)',
  });
  return bytes.slice(0, 352);
}

/**
 * Encodes all maps of a decomposition (`maps`: k volumes on the grid, x fastest) into the file's
 * bytes. The in-mask set is the mask's voxels plus any voxel where a map is non-zero, so nothing a
 * map holds is dropped.
 */
export function encodeDeskMaps(input: {
  dims: [number, number, number];
  k: number;
  grid: Grid;
  readMap: (c: number) => ArrayLike<number>;
  mask?: ArrayLike<number> | null;
}): Uint8Array {
  const [nx, ny, nz] = input.dims;
  const nVox = nx * ny * nz;
  const keep = new Uint8Array(nVox);
  if (input.mask) for (let i = 0; i < nVox; i++) keep[i] = input.mask[i] ? 1 : 0;
  for (let c = 0; c < input.k; c++) {
    const m = input.readMap(c);
    for (let i = 0; i < nVox; i++) if (m[i] !== 0 && !Number.isNaN(m[i])) keep[i] = 1;
  }
  const inMask = maskIndices(keep);
  const layout: MapLayout = { k: input.k, dims: input.dims, inMask, niftiHeader: headerTemplate(input.dims, input.grid) };
  const nIn = inMask.length;
  const q = new Int16Array(input.k * nIn);
  const scales = new Float32Array(input.k);
  const values = new Float32Array(nIn);
  for (let c = 0; c < input.k; c++) {
    const m = input.readMap(c);
    for (let j = 0; j < nIn; j++) values[j] = m[inMask[j]];
    scales[c] = quantiseMap(values, q.subarray(c * nIn, (c + 1) * nIn));
  }
  const head = encodeLayout(layout);
  const body = encodeMaps({ from: 1, count: input.k, nIn, scales, q });
  const out = new Uint8Array(8 + head.byteLength + body.byteLength);
  const view = new DataView(out.buffer);
  view.setUint32(0, head.byteLength, true);
  view.setUint32(4, body.byteLength, true);
  out.set(head, 8);
  out.set(body, 8 + head.byteLength);
  return out;
}

async function writeAtomically(key: string, bytes: Uint8Array) {
  const full = pathFor(key);
  const temp = `${full}.${process.pid}.${Date.now()}.part`;
  const fh = await open(temp, 'w');
  try {
    await fh.writeFile(bytes);
  } finally {
    await fh.close();
  }
  await rename(temp, full).catch(async (err) => {
    await rm(temp, { force: true });
    throw err;
  });
}

/** Writes the desk maps of a decomposition held in memory (at store time). */
export async function storeDeskMaps(componentsKey: string, input: Parameters<typeof encodeDeskMaps>[0]): Promise<void> {
  await writeAtomically(deskMapsKey(componentsKey), encodeDeskMaps(input));
}

const building = new Map<string, Promise<void>>();

/** Makes the desk maps from the stored NIfTI files when they are missing (one build per key at a time). */
async function ensureDeskMaps(componentsKey: string, maskKey: string | null): Promise<void> {
  const key = deskMapsKey(componentsKey);
  if (
    await stat(pathFor(key)).then(
      () => true,
      () => false,
    )
  )
    return;
  let job = building.get(key);
  if (!job) {
    job = (async () => {
      const image = await readNiftiFile(pathFor(componentsKey));
      const mask = maskKey
        ? await readNiftiFile(pathFor(maskKey)).then(
            (m) => m.readVolume(0),
            () => null,
          )
        : null;
      const frame = new Float32Array(image.voxelsPerVolume);
      await storeDeskMaps(componentsKey, {
        dims: [image.nx, image.ny, image.nz],
        k: image.nt,
        grid: image.header,
        readMap: (c) => image.readVolume(c, frame),
        mask: mask && mask.length === image.voxelsPerVolume ? mask : null,
      });
    })().finally(() => building.delete(key));
    building.set(key, job);
  }
  await job;
}

export type DeskMapsFile = {
  /** The layout message. */
  layout(): Promise<Uint8Array>;
  /** A maps message for components from..to (1-based, inclusive; the caller checked the range). */
  maps(from: number, to: number): Promise<Uint8Array>;
  k: number;
};

/** Opens a decomposition's desk maps (making them first if needed). */
export async function openDeskMaps(componentsKey: string, maskKey: string | null): Promise<DeskMapsFile> {
  await ensureDeskMaps(componentsKey, maskKey);
  const path = pathFor(deskMapsKey(componentsKey));
  const readAt = async (position: number, length: number) => {
    const fh = await open(path, 'r');
    try {
      const buf = new Uint8Array(length);
      const { bytesRead } = await fh.read(buf, 0, length, position);
      if (bytesRead !== length) throw new Error(`the desk maps file ${path} is cut short`);
      return buf;
    } finally {
      await fh.close();
    }
  };
  const head = new DataView((await readAt(0, 8)).buffer);
  const layoutBytes = head.getUint32(0, true);
  const bodyAt = 8 + layoutBytes;
  const bodyHead = new DataView((await readAt(bodyAt, 16)).buffer);
  const k = bodyHead.getUint32(8, true);
  const nIn = bodyHead.getUint32(12, true);
  return {
    k,
    layout: () => readAt(8, layoutBytes),
    async maps(from, to) {
      const count = to - from + 1;
      const scales = await readAt(bodyAt + 16 + 4 * (from - 1), 4 * count);
      const q = await readAt(bodyAt + 16 + 4 * k + 2 * nIn * (from - 1), 2 * nIn * count);
      const out = new Uint8Array(mapsByteLength(count, nIn));
      const view = new DataView(out.buffer);
      out.set(new TextEncoder().encode('QDM1'));
      view.setUint32(4, from, true);
      view.setUint32(8, count, true);
      view.setUint32(12, nIn, true);
      out.set(scales, 16);
      out.set(q, 16 + 4 * count);
      return out;
    },
  };
}
