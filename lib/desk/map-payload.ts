/**
 * The desk's map payload: a run's component z-maps cut down to what the desk shows, in two binary
 * messages (little-endian; no Node or browser APIs, so the server encodes and the browser decodes
 * the same bytes).
 *
 * Layout (once per decomposition): the grid, the voxels that carry a map value, and a NIfTI-1
 * header template the browser turns into the viewer's map volume.
 *   "QDL1" · u32 k · u32 nx · u32 ny · u32 nz · u32 nIn · u32 headerBytes · header · mask bits
 *   (bit i of byte i>>3 set = voxel i, x fastest, carries a value; LSB first)
 *
 * Maps (components from..from+count-1, 1-based): each map's in-mask values quantised to 16 bits
 * with the map's own scale, z ≈ q · scale with scale = max|z| / 32767. The rounding error is at
 * most scale / 2 = max|z| / 65534 (a map whose max |z| is 20 reads true to ±0.0003 z), and a map's
 * largest |z| itself comes back exact to float precision (it is q = ±32767). Values that are not
 * finite are stored as 0. The voxels outside the layout's mask are exactly 0 in every map.
 *   "QDM1" · u32 from · u32 count · u32 nIn · f32 scale[count] · i16 q[count][nIn]
 */

export const LAYOUT_MAGIC = 'QDL1';
export const MAPS_MAGIC = 'QDM1';
const Q_MAX = 32767;
const LAYOUT_FIXED = 28;
const MAPS_FIXED = 16;

export type MapLayout = {
  k: number;
  dims: [number, number, number];
  /** Grid indices (x fastest) of the voxels that carry a value, ascending. */
  inMask: Uint32Array;
  /** A NIfTI-1 header (352 bytes: header + empty extension flag) for one float32 volume on the grid. */
  niftiHeader: Uint8Array;
};

export type QuantisedMaps = {
  from: number;
  count: number;
  nIn: number;
  /** z = q · scale, per map. */
  scales: Float32Array;
  /** count × nIn values, map-major. */
  q: Int16Array;
};

const NATIVE_LE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

class PayloadError extends Error {}

function writeMagic(view: DataView, magic: string) {
  for (let i = 0; i < 4; i++) view.setUint8(i, magic.charCodeAt(i));
}
function readMagic(view: DataView): string {
  if (view.byteLength < 4) return '';
  return String.fromCharCode(view.getUint8(0), view.getUint8(1), view.getUint8(2), view.getUint8(3));
}
const viewOf = (bytes: Uint8Array) => new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);

/** The grid indices of a mask (non-zero = in), ascending. */
export function maskIndices(mask: ArrayLike<number>): Uint32Array {
  let n = 0;
  for (let i = 0; i < mask.length; i++) if (mask[i]) n++;
  const out = new Uint32Array(n);
  for (let i = 0, j = 0; i < mask.length; i++) if (mask[i]) out[j++] = i;
  return out;
}

export function encodeLayout(layout: MapLayout): Uint8Array {
  const [nx, ny, nz] = layout.dims;
  const nVox = nx * ny * nz;
  const hdr = layout.niftiHeader.byteLength;
  const bitsAt = LAYOUT_FIXED + hdr;
  const out = new Uint8Array(bitsAt + Math.ceil(nVox / 8));
  const view = viewOf(out);
  writeMagic(view, LAYOUT_MAGIC);
  [layout.k, nx, ny, nz, layout.inMask.length, hdr].forEach((v, i) => view.setUint32(4 + 4 * i, v, true));
  out.set(layout.niftiHeader, LAYOUT_FIXED);
  for (const i of layout.inMask) {
    if (i >= nVox) throw new PayloadError(`mask index ${i} lies outside the ${nx}×${ny}×${nz} grid`);
    out[bitsAt + (i >> 3)] |= 1 << (i & 7);
  }
  return out;
}

export function decodeLayout(bytes: Uint8Array): MapLayout {
  const view = viewOf(bytes);
  if (readMagic(view) !== LAYOUT_MAGIC || bytes.byteLength < LAYOUT_FIXED) throw new PayloadError('not a desk map layout');
  const [k, nx, ny, nz, nIn, hdr] = [0, 1, 2, 3, 4, 5].map((i) => view.getUint32(4 + 4 * i, true)) as number[];
  const nVox = nx * ny * nz;
  const bitsAt = LAYOUT_FIXED + hdr;
  if (bytes.byteLength !== bitsAt + Math.ceil(nVox / 8)) throw new PayloadError('the desk map layout has the wrong length');
  const inMask = new Uint32Array(nIn);
  let j = 0;
  for (let b = 0; b < Math.ceil(nVox / 8); b++) {
    const byte = bytes[bitsAt + b];
    if (!byte) continue;
    for (let bit = 0; bit < 8; bit++) {
      if (!(byte & (1 << bit))) continue;
      if (j >= nIn) throw new PayloadError('the desk map layout marks more voxels than it declares');
      inMask[j++] = b * 8 + bit;
    }
  }
  if (j !== nIn) throw new PayloadError('the desk map layout marks fewer voxels than it declares');
  return { k, dims: [nx, ny, nz], inMask, niftiHeader: bytes.slice(LAYOUT_FIXED, bitsAt) };
}

/** Quantises one map's in-mask values (`values[j]` is the value at grid index inMask[j]). */
export function quantiseMap(values: ArrayLike<number>, q: Int16Array): number {
  let max = 0;
  for (let j = 0; j < values.length; j++) {
    const a = Math.abs(values[j]);
    if (a > max && Number.isFinite(a)) max = a;
  }
  const scale = max > 0 ? max / Q_MAX : 0;
  for (let j = 0; j < values.length; j++) {
    const v = values[j];
    q[j] = scale > 0 && Number.isFinite(v) ? Math.max(-Q_MAX, Math.min(Q_MAX, Math.round(v / scale))) : 0;
  }
  return Math.fround(scale);
}

/** Byte length of a maps message with `count` maps of nIn values. */
export const mapsByteLength = (count: number, nIn: number) => MAPS_FIXED + 4 * count + 2 * count * nIn;

export function encodeMaps(m: QuantisedMaps): Uint8Array {
  const out = new Uint8Array(mapsByteLength(m.count, m.nIn));
  const view = viewOf(out);
  writeMagic(view, MAPS_MAGIC);
  view.setUint32(4, m.from, true);
  view.setUint32(8, m.count, true);
  view.setUint32(12, m.nIn, true);
  for (let c = 0; c < m.count; c++) view.setFloat32(MAPS_FIXED + 4 * c, m.scales[c], true);
  const qAt = MAPS_FIXED + 4 * m.count;
  for (let i = 0; i < m.count * m.nIn; i++) view.setInt16(qAt + 2 * i, m.q[i], true);
  return out;
}

export function decodeMaps(bytes: Uint8Array): QuantisedMaps {
  const view = viewOf(bytes);
  if (readMagic(view) !== MAPS_MAGIC || bytes.byteLength < MAPS_FIXED) throw new PayloadError('not desk maps');
  const from = view.getUint32(4, true);
  const count = view.getUint32(8, true);
  const nIn = view.getUint32(12, true);
  if (bytes.byteLength !== mapsByteLength(count, nIn)) throw new PayloadError('the desk maps have the wrong length');
  const scales = new Float32Array(count);
  for (let c = 0; c < count; c++) scales[c] = view.getFloat32(MAPS_FIXED + 4 * c, true);
  const qAt = MAPS_FIXED + 4 * count;
  const at = bytes.byteOffset + qAt;
  let q: Int16Array;
  if (NATIVE_LE && at % 2 === 0) q = new Int16Array(bytes.buffer.slice(at, at + 2 * count * nIn));
  else {
    q = new Int16Array(count * nIn);
    for (let i = 0; i < q.length; i++) q[i] = view.getInt16(qAt + 2 * i, true);
  }
  return { from, count, nIn, scales, q };
}

/** Map `c` (0-based within the message) on the whole grid: z at the mask's voxels, 0 elsewhere. */
export function expandMap(layout: MapLayout, maps: QuantisedMaps, c: number, out?: Float32Array): Float32Array {
  const [nx, ny, nz] = layout.dims;
  const grid = out ?? new Float32Array(nx * ny * nz);
  if (!out) grid.fill(0);
  const nIn = layout.inMask.length;
  if (maps.nIn !== nIn) throw new PayloadError('the maps do not fit the layout');
  const scale = maps.scales[c];
  const off = c * nIn;
  for (let j = 0; j < nIn; j++) grid[layout.inMask[j]] = maps.q[off + j] * scale;
  return grid;
}

/**
 * The viewer's map volume as a single-file NIfTI-1: the layout's header (one float32 volume on the
 * grid) and zeroed voxels; the viewer writes the shown map into it.
 */
export function emptyMapVolume(layout: MapLayout): ArrayBuffer {
  const [nx, ny, nz] = layout.dims;
  const hdr = layout.niftiHeader;
  const buf = new ArrayBuffer(hdr.byteLength + nx * ny * nz * 4);
  new Uint8Array(buf).set(hdr);
  return buf;
}
