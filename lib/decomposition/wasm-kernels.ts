// JavaScript side of the WebAssembly SIMD kernels (wasm/kernels.as.ts → wasm/kernels.wasm): each
// function has the signature of its reference kernel in kernels.ts plus a first argument, the
// instance's exports. It copies one voxel range of the SharedArrayBuffer-backed arrays into the
// instance's own memory (zero-padded to the layouts kernels.as.ts expects), calls the kernel and
// adds or copies the result out. Copies cost O(rows × voxels) against the kernels' O(rows² ×
// voxels). Like kernels.ts, every function is self-contained apart from wasmMemory (worker-pool.ts
// ships their source text to worker threads); keep it that way when editing.

/** The exports of an instance of kernels.wasm. */
export interface KernelExports {
  memory: WebAssembly.Memory;
  gram(x: number, Tp: number, n: number, out: number): void;
  project(x: number, T: number, n: number, p: number, c: number, kp: number, z: number): void;
  ica(
    z: number,
    kp: number,
    stride: number,
    nBlocks: number,
    w: number,
    contrast: number,
    alpha: number,
    G: number,
    gp: number,
    y: number,
  ): void;
  unmix(z: number, kp: number, stride: number, nBlocks: number, w: number, s: number): void;
  tanhInPlace(p: number, n: number): void;
}

/**
 * Grows the instance's memory to hold `bytes` from byte 65536 on (below is the module's own) and
 * returns fresh float32 and float64 views of the whole memory.
 */
export function wasmMemory(ex: KernelExports, bytes: number): { f32: Float32Array; f64: Float64Array } {
  const need = 65536 + bytes;
  const have = ex.memory.buffer.byteLength;
  if (have < need) ex.memory.grow(Math.ceil((need - have) / 65536));
  return { f32: new Float32Array(ex.memory.buffer), f64: new Float64Array(ex.memory.buffer) };
}

/**
 * Per-instance cache of the z ranges wasmIcaChunk copied in, for one cache key (one run of FastICA
 * iterations, during which z does not change): slot offsets by range start. Any other kernel call
 * clears it (it reuses the memory). State lives on the function itself (self-contained for workers).
 */
export function wasmCache(ex: KernelExports): { key: string | null; top: number; slots: Map<number, number> } {
  type State = { key: string | null; top: number; slots: Map<number, number> };
  const self = wasmCache as unknown as { states?: WeakMap<object, State> };
  self.states ??= new WeakMap();
  let st = self.states.get(ex);
  if (!st) {
    st = { key: null, top: 0, slots: new Map() };
    self.states.set(ex, st);
  }
  return st;
}

/**
 * gramChunk of kernels.ts on WebAssembly: float32 products summed per lane over 512-voxel blocks,
 * then in float64 (relative error ~1e-6 of Σ|x_a x_b|; the reference is float64 throughout).
 */
export function wasmGramChunk(ex: KernelExports, x: Float32Array, T: number, V: number, v0: number, v1: number, out: Float64Array): void {
  wasmCache(ex).key = null;
  const n = v1 - v0;
  const ne = (n + 3) & ~3;
  const Tp = (T + 3) & ~3;
  const xp = 65536,
    op = xp + Tp * ne * 4;
  const { f32, f64 } = wasmMemory(ex, Tp * ne * 4 + Tp * Tp * 8);
  const xo = xp / 4,
    oo = op / 8;
  for (let t = 0; t < T; t++) {
    f32.set(x.subarray(t * V + v0, t * V + v1), xo + t * ne);
    f32.fill(0, xo + t * ne + n, xo + (t + 1) * ne);
  }
  f32.fill(0, xo + T * ne, xo + Tp * ne);
  f64.fill(0, oo, oo + Tp * Tp);
  ex.gram(xp, Tp, ne, op);
  for (let a = 0; a < T; a++) for (let b = a; b < T; b++) out[a * T + b] += f64[oo + a * Tp + b]!;
}

/** projectChunk of kernels.ts on WebAssembly: float64 throughout, rounded to float32 on copy-out. */
export function wasmProjectChunk(
  ex: KernelExports,
  x: Float32Array,
  T: number,
  V: number,
  p: Float64Array,
  c: Float64Array,
  k: number,
  v0: number,
  v1: number,
  z: Float32Array,
): void {
  wasmCache(ex).key = null;
  const n = v1 - v0;
  const ne = (n + 3) & ~3;
  const kp = (k + 3) & ~3;
  const xp = 65536,
    pp = xp + T * ne * 8,
    cp = pp + kp * T * 8,
    zp = cp + kp * 8;
  const { f64 } = wasmMemory(ex, T * ne * 8 + kp * T * 8 + kp * 8 + kp * ne * 8);
  const xo = xp / 8,
    po = pp / 8,
    co = cp / 8,
    zo = zp / 8;
  for (let t = 0; t < T; t++) {
    f64.set(x.subarray(t * V + v0, t * V + v1), xo + t * ne);
    f64.fill(0, xo + t * ne + n, xo + (t + 1) * ne);
  }
  f64.fill(0, po, co + kp);
  f64.set(p.subarray(0, k * T), po);
  f64.set(c.subarray(0, k), co);
  ex.project(xp, T, ne, pp, cp, kp, zp);
  for (let i = 0; i < k; i++) z.set(f64.subarray(zo + i * ne, zo + i * ne + n), i * V + v0);
}

/**
 * icaChunk of kernels.ts on WebAssembly: float32 products and per-block sums, float64 across blocks,
 * fast tanh (kernels.as.ts tanh4) for log-cosh. Same accumulation contract (G, gp not cleared).
 * cacheKey (optional): the caller promises z is unchanged for every call with this key, so the
 * range copied in by the first call is reused (wasmCache) — FastICA's iterations pass one key.
 */
export function wasmIcaChunk(
  ex: KernelExports,
  z: Float32Array,
  k: number,
  V: number,
  w: Float64Array,
  contrast: number,
  alpha: number,
  v0: number,
  v1: number,
  G: Float64Array,
  gp: Float64Array,
  cacheKey?: string,
): void {
  const NB = 64;
  const n = v1 - v0;
  const nBlocks = Math.ceil(n / NB);
  const stride = nBlocks * NB;
  const kp = (k + 3) & ~3;
  // Scratch (W, G, gp, y) first, then the z range(s).
  const wp = 65536,
    Gp = wp + kp * kp * 16,
    gpp = Gp + kp * kp * 8,
    yp = gpp + kp * 8,
    scratchEnd = yp + kp * NB * 4;
  const zBytes = kp * stride * 4;
  const st = wasmCache(ex);
  let zp = scratchEnd;
  let copy = true;
  if (cacheKey) {
    if (st.key !== cacheKey) {
      st.key = cacheKey;
      st.slots.clear();
      st.top = scratchEnd;
    }
    const hit = st.slots.get(v0);
    if (hit !== undefined) {
      zp = hit;
      copy = false;
    } else {
      zp = st.top;
      st.top += zBytes;
      st.slots.set(v0, zp);
    }
  } else {
    st.key = null;
  }
  const { f32, f64 } = wasmMemory(ex, zp + zBytes - 65536);
  const zo = zp / 4,
    wo = wp / 4,
    Go = Gp / 8,
    gpo = gpp / 8;
  if (copy) {
    for (let i = 0; i < k; i++) {
      f32.set(z.subarray(i * V + v0, i * V + v1), zo + i * stride);
      f32.fill(0, zo + i * stride + n, zo + (i + 1) * stride);
    }
    f32.fill(0, zo + k * stride, zo + kp * stride);
  }
  // W pre-broadcast: entry (i, j) as 4 equal float32 at wo + 4·(i·kp + j).
  f32.fill(0, wo, wo + 4 * kp * kp);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const v = w[i * k + j]!,
        o = wo + 4 * (i * kp + j);
      f32[o] = v;
      f32[o + 1] = v;
      f32[o + 2] = v;
      f32[o + 3] = v;
    }
  }
  f64.fill(0, Go, gpo + kp);
  ex.ica(zp, kp, stride, nBlocks, wp, contrast, alpha, Gp, gpp, yp);
  // Padded voxels have y = 0 exactly; remove their g'(0) (α for log-cosh, 1 for exp, 0 for cube).
  const pads = stride - n;
  const gp0 = contrast === 0 ? Math.fround(alpha) : contrast === 1 ? 1 : 0;
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) G[i * k + j] += f64[Go + i * kp + j]!;
    gp[i] += f64[gpo + i]! - pads * gp0;
  }
}

/** unmixChunk of kernels.ts on WebAssembly (float32, W rounded to float32, fused multiply-adds). */
export function wasmUnmixChunk(
  ex: KernelExports,
  z: Float32Array,
  k: number,
  V: number,
  w: Float64Array,
  v0: number,
  v1: number,
  s: Float32Array,
): void {
  wasmCache(ex).key = null;
  const NB = 64;
  const n = v1 - v0;
  const nBlocks = Math.ceil(n / NB);
  const stride = nBlocks * NB;
  const kp = (k + 3) & ~3;
  const zp = 65536,
    wp = zp + kp * stride * 4,
    sp = wp + kp * kp * 16;
  const { f32 } = wasmMemory(ex, 2 * kp * stride * 4 + kp * kp * 16);
  const zo = zp / 4,
    wo = wp / 4,
    so = sp / 4;
  for (let i = 0; i < k; i++) {
    f32.set(z.subarray(i * V + v0, i * V + v1), zo + i * stride);
    f32.fill(0, zo + i * stride + n, zo + (i + 1) * stride);
  }
  f32.fill(0, zo + k * stride, zo + kp * stride);
  // W pre-broadcast: entry (i, j) as 4 equal float32 at wo + 4·(i·kp + j).
  f32.fill(0, wo, wo + 4 * kp * kp);
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const v = w[i * k + j]!,
        o = wo + 4 * (i * kp + j);
      f32[o] = v;
      f32[o + 1] = v;
      f32[o + 2] = v;
      f32[o + 3] = v;
    }
  }
  ex.unmix(zp, kp, stride, nBlocks, wp, sp);
  for (let i = 0; i < k; i++) s.set(f32.subarray(so + i * stride, so + i * stride + n), i * V + v0);
}
