// WebAssembly SIMD kernels (lib/decomposition/wasm/) against the JavaScript reference kernels of
// kernels.ts and against exact Math.tanh; the committed kernels.wasm against a fresh build.
import { readFileSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { gramChunk, icaChunk, projectChunk, unmixChunk } from '@/lib/decomposition/kernels';
import { wasmGramChunk, wasmIcaChunk, wasmMemory, wasmProjectChunk, wasmUnmixChunk } from '@/lib/decomposition/wasm-kernels';
import { KernelPool, kernelInstance, sharedFloat32 } from '@/lib/decomposition/worker-pool';
import { fastIca, symmetricDecorrelation } from '@/lib/decomposition/fastica';
import { createRng } from '@/lib/random';
// @ts-expect-error — plain ES module without types
import { compileKernels } from '../../scripts/build-kernels.mjs';

const ex = kernelInstance();

function randomF32(n: number, seed: number): Float32Array {
  const g = createRng(seed, 'direct').gauss;
  return Float32Array.from({ length: n }, () => g());
}
function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]! - b[i]!));
  return m;
}
function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]!));
  return m;
}

describe('WebAssembly kernels', () => {
  it('committed kernels.wasm is a fresh build of kernels.as.ts (npm run build:kernels)', async () => {
    const fresh: Buffer = await compileKernels();
    const committed = readFileSync(new URL('../../lib/decomposition/wasm/kernels.wasm', import.meta.url));
    expect(Buffer.compare(committed, fresh)).toBe(0);
  }, 60_000);

  it('fast tanh is within 5e-7 of exact Math.tanh on [−12, 12] and saturates to ±1', () => {
    // Exact reference: Math.tanh (ECMAScript; correctly rounded to ~1 ulp in V8's fdlibm port).
    const n = 240_000;
    const xs = Float32Array.from({ length: n }, (_, i) => -12 + (24 * i) / n);
    const { f32 } = wasmMemory(ex, n * 4);
    f32.set(xs, 65536 / 4);
    ex.tanhInPlace(65536, n);
    let worst = 0;
    for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(f32[65536 / 4 + i]! - Math.tanh(xs[i]!)));
    expect(worst).toBeLessThan(5e-7);
    expect(worst).toBeGreaterThan(0); // it is an approximation, not the exact function
    f32.set([30, -30, 0, 1e-6], 65536 / 4);
    ex.tanhInPlace(65536, 4);
    expect(Array.from(f32.subarray(65536 / 4, 65536 / 4 + 4))).toEqual(
      [1, -1, 0, Math.fround((Math.fround(1e-6) * Math.fround(4.89352455891786e-3)) / Math.fround(4.89352518554385e-3))].map((v) =>
        Math.fround(v),
      ),
    );
  });

  // Odd sizes exercise the zero padding (T, k not multiples of 4; voxel ranges not multiples of 64).
  const T = 37,
    V = 1001,
    k = 11,
    v0 = 13,
    v1 = 990;

  it('gram (float32 products, float64 across 512-voxel blocks) matches the float64 JS reference to 1e-6 relative', () => {
    const x = randomF32(T * V, 1);
    const a = new Float64Array(T * T),
      b = new Float64Array(T * T);
    gramChunk(x, T, V, v0, v1, a);
    wasmGramChunk(ex, x, T, V, v0, v1, b);
    let worst = 0;
    for (let i = 0; i < T; i++) for (let j = i; j < T; j++) worst = Math.max(worst, Math.abs(a[i * T + j]! - b[i * T + j]!));
    // Tolerance: float32 rounding (6e-8) × √(128 terms a lane) ≈ 7e-7; an index error would be ~1.
    expect(worst / maxAbs(a)).toBeLessThan(1e-6);
  });

  it('projection (float64, float32 out) matches the JS reference to float32 rounding', () => {
    const x = randomF32(T * V, 2);
    const p = Float64Array.from(randomF32(k * T, 3));
    const c = Float64Array.from(randomF32(k, 4));
    const a = new Float32Array(k * V),
      b = new Float32Array(k * V);
    projectChunk(x, T, V, p, c, k, v0, v1, a);
    wasmProjectChunk(ex, x, T, V, p, c, k, v0, v1, b);
    expect(maxAbsDiff(a, b) / maxAbs(a)).toBeLessThan(1e-6);
    expect(b[v0 - 1]).toBe(0); // outside the range untouched
  });

  it('one FastICA pass (G, Σg′) matches the JS reference within float32 tolerance for every contrast', () => {
    const z = randomF32(k * V, 5);
    const w = symmetricDecorrelation(Float64Array.from(randomF32(k * k, 6)), k);
    for (const contrast of [0, 1, 2]) {
      const Ga = new Float64Array(k * k),
        Gb = new Float64Array(k * k);
      const ga = new Float64Array(k),
        gb = new Float64Array(k);
      icaChunk(z, k, V, w, contrast, 1.3, v0, v1, Ga, ga);
      wasmIcaChunk(ex, z, k, V, w, contrast, 1.3, v0, v1, Gb, gb);
      // Tolerance: float32 products/sums of ≤ 1000 terms of size ≤ ~10 and W rounded to float32 — about
      // 1e-5 relative to the largest entry; a wrong index or a missing term would be ~1.
      expect(maxAbsDiff(Ga, Gb) / maxAbs(Ga)).toBeLessThan(2e-5);
      expect(maxAbsDiff(ga, gb) / maxAbs(ga)).toBeLessThan(2e-5);
    }
  });

  it('a cached FastICA pass (cache key) equals an uncached one; a new key or another kernel call re-copies z', () => {
    const z = randomF32(k * V, 9);
    const w = symmetricDecorrelation(Float64Array.from(randomF32(k * k, 10)), k);
    const pass = (zz: Float32Array, key?: string) => {
      const G = new Float64Array(k * k),
        gp = new Float64Array(k);
      wasmIcaChunk(ex, zz, k, V, w, 0, 1, v0, v1, G, gp, key);
      return [...G, ...gp];
    };
    const plain = pass(z);
    expect(pass(z, 'a')).toEqual(plain); // first call with key 'a' copies
    expect(pass(z, 'a')).toEqual(plain); // second reuses the copy
    const z2 = randomF32(k * V, 19);
    expect(pass(z2, 'b')).toEqual(pass(z2)); // new key: fresh copy of the new data
    pass(z, 'c');
    wasmUnmixChunk(ex, z2, k, V, w, v0, v1, new Float32Array(k * V)); // clobbers the memory
    expect(pass(z, 'c')).toEqual(plain); // … and cleared the cache, so z is copied again
  });

  it('unmix matches the JS reference within float32 tolerance', () => {
    const z = randomF32(k * V, 7);
    const w = symmetricDecorrelation(Float64Array.from(randomF32(k * k, 8)), k);
    const a = new Float32Array(k * V),
      b = new Float32Array(k * V);
    unmixChunk(z, k, V, w, v0, v1, a);
    wasmUnmixChunk(ex, z, k, V, w, v0, v1, b);
    expect(maxAbsDiff(a, b)).toBeLessThan(1e-5);
  });
});

describe('FastICA with WebAssembly kernels', () => {
  const pools: KernelPool[] = [];
  afterAll(async () => {
    await Promise.all(pools.map((p) => p.close()));
  });
  function pool(threads: number, kernels: 'wasm' | 'js'): KernelPool {
    const p = new KernelPool(threads, { kernels });
    pools.push(p);
    return p;
  }

  // Whitened mixture of k Laplacian (super-Gaussian) sources over V voxels.
  function mixture(k: number, V: number): Float32Array {
    const rnd = createRng(11, 'direct').next;
    const z = sharedFloat32(k * V);
    for (let i = 0; i < k * V; i++) {
      const u = rnd() - 0.5;
      z[i] = (-Math.sign(u) * Math.log(1 - 2 * Math.abs(u))) / Math.SQRT2;
    }
    const q = symmetricDecorrelation(Float64Array.from(randomF32(k * k, 12)), k);
    const out = sharedFloat32(k * V);
    unmixChunk(z, k, V, q, 0, V, out);
    return out;
  }

  it('converges to the same unmixing matrix as the JS kernels (max |ΔW| < 1e-3) and is bit-identical on 1 and 2 threads', async () => {
    const k = 6,
      V = 20_000;
    const z = mixture(k, V);
    const ref = await fastIca(z, k, V, pool(1, 'js'), { seed: 3, warmStartVoxels: 0 });
    const one = await fastIca(z, k, V, pool(1, 'wasm'), { seed: 3, warmStartVoxels: 0 });
    const two = await fastIca(z, k, V, pool(2, 'wasm'), { seed: 3, warmStartVoxels: 0 });
    expect(ref.converged && one.converged).toBe(true);
    // Same fixed point; the float32 kernels only change the path there by rounding. Tolerance
    // 1e-3: ~ tol (1e-4) × √k of the stopping rule — common practice, no source.
    expect(maxAbsDiff(ref.w, one.w)).toBeLessThan(1e-3);
    expect(pools[2]!.parallel).toBe(true);
    expect(Array.from(two.w)).toEqual(Array.from(one.w));
    expect(two.iterations).toBe(one.iterations);
  });
});
