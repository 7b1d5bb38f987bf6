// Hot typed-array kernels of the decomposition. Every function here is self-contained (no imports,
// no closures, no nested functions) because worker-pool.ts ships their source text to worker
// threads; keep it that way when editing.

/**
 * Accumulates the upper triangle (a ≤ b) of the Gram matrix Σ_v x[a,v]·x[b,v] over voxels
 * v0 ≤ v < v1 into out[a*T + b] (float64 accumulation; entries below the diagonal are scratch).
 * x: time-major Float32Array, T × V (row t holds volume t's in-mask voxels). out: Float64Array T × T.
 * 4 × 4 register blocking over time points, voxel blocks of 256 for cache reuse.
 */
export function gramChunk(x: Float32Array, T: number, V: number, v0: number, v1: number, out: Float64Array): void {
  const NB = 256;
  const T4 = T - (T % 4);
  for (let vb = v0; vb < v1; vb += NB) {
    const ve = vb + NB < v1 ? vb + NB : v1;
    for (let a = 0; a < T4; a += 4) {
      const ra0 = a * V,
        ra1 = ra0 + V,
        ra2 = ra1 + V,
        ra3 = ra2 + V;
      for (let b = a; b < T4; b += 4) {
        const rb0 = b * V,
          rb1 = rb0 + V,
          rb2 = rb1 + V,
          rb3 = rb2 + V;
        let s00 = 0,
          s01 = 0,
          s02 = 0,
          s03 = 0,
          s10 = 0,
          s11 = 0,
          s12 = 0,
          s13 = 0;
        let s20 = 0,
          s21 = 0,
          s22 = 0,
          s23 = 0,
          s30 = 0,
          s31 = 0,
          s32 = 0,
          s33 = 0;
        for (let v = vb; v < ve; v++) {
          const x0 = x[ra0 + v],
            x1 = x[ra1 + v],
            x2 = x[ra2 + v],
            x3 = x[ra3 + v];
          const y0 = x[rb0 + v],
            y1 = x[rb1 + v],
            y2 = x[rb2 + v],
            y3 = x[rb3 + v];
          s00 += x0 * y0;
          s01 += x0 * y1;
          s02 += x0 * y2;
          s03 += x0 * y3;
          s10 += x1 * y0;
          s11 += x1 * y1;
          s12 += x1 * y2;
          s13 += x1 * y3;
          s20 += x2 * y0;
          s21 += x2 * y1;
          s22 += x2 * y2;
          s23 += x2 * y3;
          s30 += x3 * y0;
          s31 += x3 * y1;
          s32 += x3 * y2;
          s33 += x3 * y3;
        }
        let o = a * T + b;
        out[o] += s00;
        out[o + 1] += s01;
        out[o + 2] += s02;
        out[o + 3] += s03;
        o += T;
        out[o] += s10;
        out[o + 1] += s11;
        out[o + 2] += s12;
        out[o + 3] += s13;
        o += T;
        out[o] += s20;
        out[o + 1] += s21;
        out[o + 2] += s22;
        out[o + 3] += s23;
        o += T;
        out[o] += s30;
        out[o + 1] += s31;
        out[o + 2] += s32;
        out[o + 3] += s33;
      }
    }
    // Remaining pairs touching the last T mod 4 time points.
    for (let a = 0; a < T; a++) {
      const bStart = a < T4 ? T4 : a;
      const ra = a * V;
      for (let b = bStart; b < T; b++) {
        const rb = b * V;
        let s = 0;
        for (let v = vb; v < ve; v++) s += x[ra + v] * x[rb + v];
        out[a * T + b] += s;
      }
    }
  }
}

/**
 * Projects time-major data onto k temporal patterns: z[i, v] = Σ_t p[i*T + t]·x[t, v] − c[i], for
 * voxels v0 ≤ v < v1. x: Float32Array T × V (time-major); p: Float64Array k × T; c: Float64Array k;
 * z: Float32Array k × V (component-major). Float64 accumulation in voxel blocks of 256, 4 rows of p
 * at a time.
 */
export function projectChunk(
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
  const NB = 256;
  const acc = new Float64Array(4 * NB);
  for (let vb = v0; vb < v1; vb += NB) {
    const n = vb + NB < v1 ? NB : v1 - vb;
    for (let i = 0; i < k; i += 4) {
      const m = i + 4 <= k ? 4 : k - i;
      acc.fill(0);
      for (let t = 0; t < T; t++) {
        const p0 = p[i * T + t];
        const p1 = m > 1 ? p[(i + 1) * T + t] : 0;
        const p2 = m > 2 ? p[(i + 2) * T + t] : 0;
        const p3 = m > 3 ? p[(i + 3) * T + t] : 0;
        const off = t * V + vb;
        for (let b = 0; b < n; b++) {
          const xv = x[off + b];
          acc[b] += p0 * xv;
          acc[NB + b] += p1 * xv;
          acc[2 * NB + b] += p2 * xv;
          acc[3 * NB + b] += p3 * xv;
        }
      }
      for (let r = 0; r < m; r++) {
        const zo = (i + r) * V + vb;
        const ci = c[i + r];
        for (let b = 0; b < n; b++) z[zo + b] = acc[r * NB + b] - ci;
      }
    }
  }
}

/**
 * One FastICA fixed-point pass over voxels v0 ≤ v < v1 (Hyvärinen 1999, IEEE TNN 10:626, eq. for
 * the symmetric approach): with y = W·z, accumulates G[i, j] += Σ_v g(y_i[v])·z_j[v] and
 * gp[i] += Σ_v g'(y_i[v]). z: whitened Float32Array k × V (component-major); w: Float64Array k × k;
 * g, g' by contrast code 0 = log-cosh (g = tanh(αu), g' = α(1 − tanh²)), 1 = exp
 * (g = u·e^{−u²/2}, g' = (1 − u²)e^{−u²/2}), 2 = cube (g = u³, g' = 3u²). G: Float64Array k × k,
 * gp: Float64Array k (both accumulated, not cleared).
 */
export function icaChunk(
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
): void {
  const NB = 256;
  const y = new Float64Array(k * NB);
  for (let vb = v0; vb < v1; vb += NB) {
    const n = vb + NB < v1 ? NB : v1 - vb;
    y.fill(0);
    for (let i = 0; i < k; i++) {
      const yo = i * NB;
      for (let j = 0; j < k; j++) {
        const wij = w[i * k + j];
        const zo = j * V + vb;
        for (let b = 0; b < n; b++) y[yo + b] += wij * z[zo + b];
      }
      let sp = 0;
      if (contrast === 0) {
        for (let b = 0; b < n; b++) {
          const u = alpha * y[yo + b];
          // tanh via exp: tanh(u) = 1 − 2/(e^{2u} + 1); guarded against overflow for large |u|.
          const th = u > 20 ? 1 : u < -20 ? -1 : 1 - 2 / (Math.exp(2 * u) + 1);
          y[yo + b] = th;
          sp += 1 - th * th;
        }
        sp *= alpha;
      } else if (contrast === 1) {
        for (let b = 0; b < n; b++) {
          const u = y[yo + b];
          const e = Math.exp(-0.5 * u * u);
          y[yo + b] = u * e;
          sp += (1 - u * u) * e;
        }
      } else {
        for (let b = 0; b < n; b++) {
          const u = y[yo + b];
          y[yo + b] = u * u * u;
          sp += 3 * u * u;
        }
      }
      gp[i] += sp;
    }
    for (let i = 0; i < k; i++) {
      const yo = i * NB;
      for (let j = 0; j < k; j++) {
        const zo = j * V + vb;
        let s = 0;
        for (let b = 0; b < n; b++) s += y[yo + b] * z[zo + b];
        G[i * k + j] += s;
      }
    }
  }
}

/**
 * Spatial maps s = W·z for voxels v0 ≤ v < v1. z: Float32Array k × V (component-major);
 * w: Float64Array k × k; s: Float32Array k × V.
 */
export function unmixChunk(z: Float32Array, k: number, V: number, w: Float64Array, v0: number, v1: number, s: Float32Array): void {
  const NB = 256;
  const acc = new Float64Array(NB);
  for (let vb = v0; vb < v1; vb += NB) {
    const n = vb + NB < v1 ? NB : v1 - vb;
    for (let i = 0; i < k; i++) {
      acc.fill(0);
      for (let j = 0; j < k; j++) {
        const wij = w[i * k + j];
        const zo = j * V + vb;
        for (let b = 0; b < n; b++) acc[b] += wij * z[zo + b];
      }
      const so = i * V + vb;
      for (let b = 0; b < n; b++) s[so + b] = acc[b];
    }
  }
}
