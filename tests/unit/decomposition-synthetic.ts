// Synthetic runs for the decomposition tests (invented data; not a check value).
import { createRng } from '@/lib/random';
import type { RunImage } from '@/lib/decomposition/data-matrix';

export interface SyntheticRun {
  image: RunImage;
  dims: [number, number, number];
  T: number;
  /** True maps, k × nVox full volume (source-major). */
  maps: Float64Array[];
  /** True time courses, k × T. */
  timecourses: Float64Array[];
  data: Float32Array;
}

/** In-memory 4D image over a full-volume array (x fastest, t slowest). */
export function imageFromArray(data: Float32Array, dims: [number, number, number], T: number, tr = 2): RunImage {
  const n = dims[0] * dims[1] * dims[2];
  return {
    nx: dims[0],
    ny: dims[1],
    nz: dims[2],
    nt: T,
    voxelsPerVolume: n,
    header: { trSeconds: tr },
    readVolume(t: number, out?: Float32Array) {
      const o = out ?? new Float32Array(n);
      o.set(data.subarray(t * n, (t + 1) * n));
      return o;
    },
  };
}

/**
 * k sparse blob sources (Gaussian blobs, centres spread along x, non-Gaussian spatial distribution),
 * random smooth-ish time courses, baseline 100, white noise of SD `noise`.
 */
export function syntheticRun(
  opts: { dims?: [number, number, number]; T?: number; k?: number; noise?: number; seed?: number } = {},
): SyntheticRun {
  const dims = opts.dims ?? [16, 16, 8];
  const T = opts.T ?? 80;
  const k = opts.k ?? 4;
  const noise = opts.noise ?? 0.5;
  const u = createRng(opts.seed ?? 7, 'direct').next;
  const g = createRng((opts.seed ?? 7) + 1000, 'direct').gauss;
  const [nx, ny, nz] = dims;
  const n = nx * ny * nz;
  const maps: Float64Array[] = [];
  const tcs: Float64Array[] = [];
  for (let s = 0; s < k; s++) {
    // Centres spread along x so the blobs barely overlap (spatially independent sources).
    const cx = ((s + 0.3 + 0.4 * u()) / k) * nx,
      cy = (0.25 + 0.5 * u()) * ny,
      cz = (0.25 + 0.5 * u()) * nz;
    const r = 0.8 + u() * 0.7;
    const m = new Float64Array(n);
    for (let z = 0; z < nz; z++)
      for (let y = 0; y < ny; y++)
        for (let x = 0; x < nx; x++) {
          const d2 = (x - cx) ** 2 + (y - cy) ** 2 + ((z - cz) * 1.5) ** 2;
          m[x + nx * (y + ny * z)] = 5 * Math.exp(-d2 / (2 * r * r));
        }
    maps.push(m);
    const tc = new Float64Array(T);
    let prev = 0;
    for (let t = 0; t < T; t++) {
      prev = 0.6 * prev + g();
      tc[t] = prev;
    }
    tcs.push(tc);
  }
  const data = new Float32Array(n * T);
  for (let t = 0; t < T; t++) {
    for (let i = 0; i < n; i++) {
      let v = 100 + noise * g();
      for (let s = 0; s < k; s++) v += maps[s]![i]! * tcs[s]![t]!;
      data[t * n + i] = v;
    }
  }
  return { image: imageFromArray(data, dims, T), dims, T, maps, timecourses: tcs, data };
}

/** Pearson correlation of two equal-length arrays. */
export function pearson(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const n = a.length;
  let ma = 0,
    mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i]!;
    mb += b[i]!;
  }
  ma /= n;
  mb /= n;
  let sab = 0,
    saa = 0,
    sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = a[i]! - ma,
      db = b[i]! - mb;
    sab += da * db;
    saa += da * da;
    sbb += db * db;
  }
  return sab / Math.sqrt(saa * sbb);
}
