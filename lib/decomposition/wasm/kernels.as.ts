// WebAssembly SIMD kernels of the decomposition, in AssemblyScript (compiled by
// scripts/build-kernels.mjs into kernels.wasm beside this file; `npm run build:kernels`).
// Every function works on raw pointers into this module's own linear memory; the JavaScript side
// (wasm-kernels.ts) copies a voxel range in, calls one function, and copies the result out. No
// allocation, no runtime: memory from byte 65536 upwards belongs to the caller.
// Multiply-adds use relaxed SIMD (relaxed_madd: one fused multiply-add where the CPU has FMA, as
// x86-64 with FMA3 does; mul + add elsewhere), so the last bits of a result can differ between
// CPU kinds but never between runs or thread counts on one machine.
// Layouts: row-major, rows padded by the caller (voxel rows to a multiple of NB = 64, row counts
// to a multiple of 4) with zeros, so no function needs a remainder loop.

// @ts-nocheck — AssemblyScript (f32, f64, v128 and the SIMD built-ins are not TypeScript).

const NB: i32 = 64;

/**
 * Gram matrix of a block: out[a*Tp + b] += Σ_v x[a,v]·x[b,v] for a ≤ b (entries below the diagonal
 * inside 4 × 2 tiles are scratch). x: f32 Tp × n (row stride n, n a multiple of 4, zero-padded);
 * out: f64 Tp × Tp. Tp a multiple of 4. Float32 products and per-lane sums over voxel blocks of
 * VB = 512 (128 terms a lane), added to out in float64; 4 × 2 register tile of f32x4 sums.
 */
export function gram(x: usize, Tp: i32, n: i32, out: usize): void {
  const VB = 512;
  const rs = <usize>n << 2;
  const os = <usize>Tp << 3;
  for (let vb = 0; vb < n; vb += VB) {
    const ve = min(vb + VB, n);
    for (let a = 0; a < Tp; a += 4) {
      const ra = x + ((<usize>a * n) << 2);
      for (let b = a; b < Tp; b += 2) {
        const rb = x + ((<usize>b * n) << 2);
        let s00 = f32x4.splat(0), s01 = f32x4.splat(0);
        let s10 = f32x4.splat(0), s11 = f32x4.splat(0);
        let s20 = f32x4.splat(0), s21 = f32x4.splat(0);
        let s30 = f32x4.splat(0), s31 = f32x4.splat(0);
        for (let v = vb; v < ve; v += 4) {
          const o = <usize>v << 2;
          const x0 = v128.load(ra + o), x1 = v128.load(ra + rs + o), x2 = v128.load(ra + 2 * rs + o), x3 = v128.load(ra + 3 * rs + o);
          const y0 = v128.load(rb + o), y1 = v128.load(rb + rs + o);
          s00 = f32x4.relaxed_madd(x0, y0, s00); s01 = f32x4.relaxed_madd(x0, y1, s01);
          s10 = f32x4.relaxed_madd(x1, y0, s10); s11 = f32x4.relaxed_madd(x1, y1, s11);
          s20 = f32x4.relaxed_madd(x2, y0, s20); s21 = f32x4.relaxed_madd(x2, y1, s21);
          s30 = f32x4.relaxed_madd(x3, y0, s30); s31 = f32x4.relaxed_madd(x3, y1, s31);
        }
        let o = out + ((<usize>a * Tp + b) << 3);
        store<f64>(o, load<f64>(o) + hsum4(s00)); store<f64>(o + 8, load<f64>(o + 8) + hsum4(s01)); o += os;
        store<f64>(o, load<f64>(o) + hsum4(s10)); store<f64>(o + 8, load<f64>(o + 8) + hsum4(s11)); o += os;
        store<f64>(o, load<f64>(o) + hsum4(s20)); store<f64>(o + 8, load<f64>(o + 8) + hsum4(s21)); o += os;
        store<f64>(o, load<f64>(o) + hsum4(s30)); store<f64>(o + 8, load<f64>(o + 8) + hsum4(s31));
      }
    }
  }
}


/**
 * Projection z[i, v] = Σ_t p[i*T + t]·x[t, v] − c[i], float64 throughout. x: f64 T × n (row stride
 * n, n a multiple of 4); p: f64 kp × T; c: f64 kp; z: f64 kp × n. kp a multiple of 4.
 * 4 rows × 4 voxels register tile.
 */
export function project(x: usize, T: i32, n: i32, p: usize, c: usize, kp: i32, z: usize): void {
  const rs = <usize>n << 3;
  for (let i = 0; i < kp; i += 4) {
    const p0 = p + ((<usize>i * T) << 3), ps = <usize>T << 3;
    const c0 = f64x2.splat(load<f64>(c + (<usize>i << 3))), c1 = f64x2.splat(load<f64>(c + (<usize>(i + 1) << 3)));
    const c2 = f64x2.splat(load<f64>(c + (<usize>(i + 2) << 3))), c3 = f64x2.splat(load<f64>(c + (<usize>(i + 3) << 3)));
    for (let v = 0; v < n; v += 4) {
      let a00 = f64x2.splat(0), a01 = f64x2.splat(0), a10 = f64x2.splat(0), a11 = f64x2.splat(0);
      let a20 = f64x2.splat(0), a21 = f64x2.splat(0), a30 = f64x2.splat(0), a31 = f64x2.splat(0);
      let xo = x + (<usize>v << 3);
      for (let t = 0; t < T; t++) {
        const x0 = v128.load(xo), x1 = v128.load(xo, 16);
        const to = <usize>t << 3;
        const q0 = f64x2.splat(load<f64>(p0 + to)), q1 = f64x2.splat(load<f64>(p0 + ps + to));
        const q2 = f64x2.splat(load<f64>(p0 + 2 * ps + to)), q3 = f64x2.splat(load<f64>(p0 + 3 * ps + to));
        a00 = f64x2.relaxed_madd(q0, x0, a00); a01 = f64x2.relaxed_madd(q0, x1, a01);
        a10 = f64x2.relaxed_madd(q1, x0, a10); a11 = f64x2.relaxed_madd(q1, x1, a11);
        a20 = f64x2.relaxed_madd(q2, x0, a20); a21 = f64x2.relaxed_madd(q2, x1, a21);
        a30 = f64x2.relaxed_madd(q3, x0, a30); a31 = f64x2.relaxed_madd(q3, x1, a31);
        xo += rs;
      }
      const zo = z + ((<usize>i * n + v) << 3);
      v128.store(zo, f64x2.sub(a00, c0)); v128.store(zo, f64x2.sub(a01, c0), 16);
      v128.store(zo + rs, f64x2.sub(a10, c1)); v128.store(zo + rs, f64x2.sub(a11, c1), 16);
      v128.store(zo + 2 * rs, f64x2.sub(a20, c2)); v128.store(zo + 2 * rs, f64x2.sub(a21, c2), 16);
      v128.store(zo + 3 * rs, f64x2.sub(a30, c3)); v128.store(zo + 3 * rs, f64x2.sub(a31, c3), 16);
    }
  }
}

/**
 * y = W·z for one block of NB voxels, float32: y[i, b] = Σ_j w[i, j]·z[j, off + b].
 * z: f32 kp × stride; w: kp × kp entries, each a v128 of 4 equal f32 (pre-broadcast by the caller);
 * y: f32 kp × ys (row stride ys, written at column yo).
 * 4 rows × 8 voxels register tile.
 */
// @ts-ignore: decorator
@inline function mulBlock(z: usize, stride: i32, off: i32, w: usize, kp: i32, y: usize, ys: i32, yo: i32): void {
  const zs = <usize>stride << 2;
  const ws = <usize>kp << 4;
  for (let i = 0; i < kp; i += 4) {
    const w0 = w + ((<usize>i * kp) << 4);
    for (let b = 0; b < NB; b += 8) {
      let a00 = f32x4.splat(0), a01 = f32x4.splat(0), a10 = f32x4.splat(0), a11 = f32x4.splat(0);
      let a20 = f32x4.splat(0), a21 = f32x4.splat(0), a30 = f32x4.splat(0), a31 = f32x4.splat(0);
      let zo = z + (<usize>(off + b) << 2);
      let wo = w0;
      for (let j = 0; j < kp; j++) {
        const z0 = v128.load(zo), z1 = v128.load(zo, 16);
        const q0 = v128.load(wo), q1 = v128.load(wo + ws);
        const q2 = v128.load(wo + 2 * ws), q3 = v128.load(wo + 3 * ws);
        a00 = f32x4.relaxed_madd(q0, z0, a00); a01 = f32x4.relaxed_madd(q0, z1, a01);
        a10 = f32x4.relaxed_madd(q1, z0, a10); a11 = f32x4.relaxed_madd(q1, z1, a11);
        a20 = f32x4.relaxed_madd(q2, z0, a20); a21 = f32x4.relaxed_madd(q2, z1, a21);
        a30 = f32x4.relaxed_madd(q3, z0, a30); a31 = f32x4.relaxed_madd(q3, z1, a31);
        zo += zs;
        wo += 16;
      }
      const yrs = <usize>ys << 2;
      const o = y + ((<usize>i * ys + yo + b) << 2);
      v128.store(o, a00); v128.store(o, a01, 16);
      v128.store(o + yrs, a10); v128.store(o + yrs, a11, 16);
      v128.store(o + 2 * yrs, a20); v128.store(o + 2 * yrs, a21, 16);
      v128.store(o + 3 * yrs, a30); v128.store(o + 3 * yrs, a31, 16);
    }
  }
}

/**
 * Fast tanh of four float32 lanes: the [13/6] rational minimax approximation used by the Eigen
 * library's ptanh_float (input clamped to ±7.90531110763549805, where it reaches ±1 in float32).
 * Max abs error vs the exact tanh ≈ 4e-7 (tests/unit/wasm-kernels.test.ts measures it).
 */
// @ts-ignore: decorator
@inline function tanh4(x0: v128): v128 {
  const x = f32x4.max(f32x4.min(x0, f32x4.splat(7.90531110763549805)), f32x4.splat(-7.90531110763549805));
  const x2 = f32x4.mul(x, x);
  let p = f32x4.splat(-2.76076847742355e-16);
  p = f32x4.add(f32x4.mul(p, x2), f32x4.splat(2.00018790482477e-13));
  p = f32x4.add(f32x4.mul(p, x2), f32x4.splat(-8.60467152213735e-11));
  p = f32x4.add(f32x4.mul(p, x2), f32x4.splat(5.12229709037114e-8));
  p = f32x4.add(f32x4.mul(p, x2), f32x4.splat(1.48572235717979e-5));
  p = f32x4.add(f32x4.mul(p, x2), f32x4.splat(6.37261928875436e-4));
  p = f32x4.add(f32x4.mul(p, x2), f32x4.splat(4.89352455891786e-3));
  p = f32x4.mul(p, x);
  let q = f32x4.splat(1.19825839466702e-6);
  q = f32x4.add(f32x4.mul(q, x2), f32x4.splat(1.18534705686654e-4));
  q = f32x4.add(f32x4.mul(q, x2), f32x4.splat(2.268434632439e-3));
  q = f32x4.add(f32x4.mul(q, x2), f32x4.splat(4.89352518554385e-3));
  return f32x4.div(p, q);
}

/** tanh of n float32 values in place (n a multiple of 4); for tests of tanh4. */
export function tanhInPlace(p: usize, n: i32): void {
  for (let i = 0; i < n; i += 4) {
    const o = p + (<usize>i << 2);
    v128.store(o, tanh4(v128.load(o)));
  }
}

/**
 * One FastICA fixed-point pass over nBlocks blocks of NB voxels (Hyvärinen 1999, IEEE TNN 10:626,
 * symmetric approach): with y = W·z, G[i, j] += Σ_v g(y_i[v])·z_j[v] and gp[i] += Σ_v g'(y_i[v]).
 * contrast 0 = log-cosh (g = tanh(αu), g' = α(1 − g²), fast tanh4), 1 = exp (g = u·e^{−u²/2},
 * g' = (1 − u²)e^{−u²/2}), 2 = cube (g = u³, g' = 3u²).
 * z: f32 kp × stride (stride = nBlocks·NB, zero-padded); w: pre-broadcast kp × kp (see mulBlock); G: f64 kp × kp; gp: f64 kp;
 * y: f32 scratch kp × NB. Sums over a block's NB voxels are float32 (per lane), added to G and gp
 * in float64. Padded voxels (y = 0) add g'(0) to gp; the caller subtracts it.
 */
export function ica(z: usize, kp: i32, stride: i32, nBlocks: i32, w: usize, contrast: i32, alpha: f32, G: usize, gp: usize, y: usize): void {
  const zs = <usize>stride << 2;
  const ys = <usize>NB << 2;
  for (let blk = 0; blk < nBlocks; blk++) {
    const off = blk * NB;
    mulBlock(z, stride, off, w, kp, y, NB, 0);
    // g and Σ g' per row.
    for (let i = 0; i < kp; i++) {
      const yo = y + <usize>i * ys;
      let sp = f32x4.splat(0);
      if (contrast == 0) {
        const al = f32x4.splat(alpha);
        const one = f32x4.splat(1);
        for (let b = 0; b < NB; b += 4) {
          const th = tanh4(f32x4.mul(al, v128.load(yo + (<usize>b << 2))));
          v128.store(yo + (<usize>b << 2), th);
          sp = f32x4.add(sp, f32x4.sub(one, f32x4.mul(th, th)));
        }
        sp = f32x4.mul(sp, al);
      } else if (contrast == 1) {
        let s: f32 = 0;
        for (let b = 0; b < NB; b++) {
          const u = load<f32>(yo + (<usize>b << 2));
          const e = Mathf.exp(<f32>-0.5 * u * u);
          store<f32>(yo + (<usize>b << 2), u * e);
          s += (1 - u * u) * e;
        }
        sp = f32x4.replace_lane(sp, 0, s);
      } else {
        const three = f32x4.splat(3);
        for (let b = 0; b < NB; b += 4) {
          const u = v128.load(yo + (<usize>b << 2));
          const u2 = f32x4.mul(u, u);
          v128.store(yo + (<usize>b << 2), f32x4.mul(u2, u));
          sp = f32x4.relaxed_madd(three, u2, sp);
        }
      }
      const go = gp + (<usize>i << 3);
      store<f64>(go, load<f64>(go) + hsum4(sp));
    }
    // G += g(y)·zᵀ over this block: 2 rows of y × 4 rows of z register tile.
    for (let i = 0; i < kp; i += 2) {
      const y0p = y + <usize>i * ys;
      const y1p = y0p + ys;
      for (let j = 0; j < kp; j += 4) {
        const z0p = z + <usize>j * zs + (<usize>off << 2);
        let s00 = f32x4.splat(0), s01 = f32x4.splat(0), s02 = f32x4.splat(0), s03 = f32x4.splat(0);
        let s10 = f32x4.splat(0), s11 = f32x4.splat(0), s12 = f32x4.splat(0), s13 = f32x4.splat(0);
        for (let b = 0; b < NB; b += 4) {
          const o = <usize>b << 2;
          const g0 = v128.load(y0p + o), g1 = v128.load(y1p + o);
          const z0 = v128.load(z0p + o), z1 = v128.load(z0p + zs + o), z2 = v128.load(z0p + 2 * zs + o), z3 = v128.load(z0p + 3 * zs + o);
          s00 = f32x4.relaxed_madd(g0, z0, s00); s01 = f32x4.relaxed_madd(g0, z1, s01);
          s02 = f32x4.relaxed_madd(g0, z2, s02); s03 = f32x4.relaxed_madd(g0, z3, s03);
          s10 = f32x4.relaxed_madd(g1, z0, s10); s11 = f32x4.relaxed_madd(g1, z1, s11);
          s12 = f32x4.relaxed_madd(g1, z2, s12); s13 = f32x4.relaxed_madd(g1, z3, s13);
        }
        const g0o = G + ((<usize>i * kp + j) << 3);
        const g1o = g0o + ((<usize>kp) << 3);
        store<f64>(g0o, load<f64>(g0o) + hsum4(s00)); store<f64>(g0o + 8, load<f64>(g0o + 8) + hsum4(s01));
        store<f64>(g0o + 16, load<f64>(g0o + 16) + hsum4(s02)); store<f64>(g0o + 24, load<f64>(g0o + 24) + hsum4(s03));
        store<f64>(g1o, load<f64>(g1o) + hsum4(s10)); store<f64>(g1o + 8, load<f64>(g1o + 8) + hsum4(s11));
        store<f64>(g1o + 16, load<f64>(g1o + 16) + hsum4(s12)); store<f64>(g1o + 24, load<f64>(g1o + 24) + hsum4(s13));
      }
    }
  }
}

// @ts-ignore: decorator
@inline function hsum4(v: v128): f64 {
  return (<f64>f32x4.extract_lane(v, 0) + <f64>f32x4.extract_lane(v, 1)) + (<f64>f32x4.extract_lane(v, 2) + <f64>f32x4.extract_lane(v, 3));
}

/** Spatial maps s = W·z over nBlocks blocks of NB voxels, float32. z, s: f32 kp × stride; w pre-broadcast (see mulBlock). */
export function unmix(z: usize, kp: i32, stride: i32, nBlocks: i32, w: usize, s: usize): void {
  for (let blk = 0; blk < nBlocks; blk++) mulBlock(z, stride, blk * NB, w, kp, s, stride, blk * NB);
}
