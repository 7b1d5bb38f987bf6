// Sign, order and scale of ICA components (ICA leaves all three undetermined).

export interface OrientedComponents {
  /** z-scored maps, component-major Float32Array k × V, ordered by variance explained. */
  maps: Float32Array;
  /** Time courses, T × k row-major Float64Array (row = volume), scaled so that x ≈ Σ a_i·map_i. */
  timecourses: Float64Array;
  /** Fraction of the total centred sum of squares explained by each component, ‖a_i‖²‖s_i‖² / SS. */
  explainedVariance: Float64Array;
  /** Map skewness after orientation (≥ 0). */
  skewness: Float64Array;
  /** For component i (output order), its index in the input order. */
  order: Int32Array;
  /** Whether component i (output order) was sign-flipped. */
  flipped: boolean[];
}

/**
 * Orients components: flips each map (and its time course) so its skewness — the heavy tail — is
 * positive (common practice, no source); orders them by variance explained, descending; z-scores
 * each map over voxels (mean 0, SD 1 with 1/V) and moves the scale into the time course.
 * s: unmixed maps, component-major Float32Array k × V; a: time courses T × k row-major;
 * totalSumSquares: Σ over voxels and volumes of the centred data squared.
 */
export function orientComponents(
  s: Float32Array,
  a: Float64Array,
  k: number,
  V: number,
  T: number,
  totalSumSquares: number,
): OrientedComponents {
  const mean = new Float64Array(k);
  const sd = new Float64Array(k);
  const skew = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    const o = i * V;
    let m = 0;
    for (let v = 0; v < V; v++) m += s[o + v]!;
    m /= V;
    let m2 = 0,
      m3 = 0;
    for (let v = 0; v < V; v++) {
      const d = s[o + v]! - m;
      m2 += d * d;
      m3 += d * d * d;
    }
    m2 /= V;
    m3 /= V;
    mean[i] = m;
    sd[i] = Math.sqrt(m2);
    skew[i] = m2 > 0 ? m3 / Math.pow(m2, 1.5) : 0;
  }
  // Variance explained of the rank-one part a_i s_iᵀ (uncentred map: that is what reconstructs x).
  const ev = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    let aa = 0;
    for (let t = 0; t < T; t++) aa += a[t * k + i]! ** 2;
    const ss = V * (sd[i]! ** 2 + mean[i]! ** 2);
    ev[i] = totalSumSquares > 0 ? (aa * ss) / totalSumSquares : 0;
  }
  const order = Int32Array.from({ length: k }, (_, i) => i).sort((p, q) => ev[q]! - ev[p]! || p - q);
  const maps = new Float32Array(k * V);
  const tcs = new Float64Array(T * k);
  const outEv = new Float64Array(k);
  const outSkew = new Float64Array(k);
  const flipped: boolean[] = [];
  for (let r = 0; r < k; r++) {
    const i = order[r]!;
    const sign = skew[i]! < 0 ? -1 : 1;
    flipped.push(sign < 0);
    const scale = sd[i]! > 0 ? sd[i]! : 1;
    const si = i * V,
      so = r * V;
    for (let v = 0; v < V; v++) maps[so + v] = (sign * (s[si + v]! - mean[i]!)) / scale;
    for (let t = 0; t < T; t++) tcs[t * k + r] = sign * scale * a[t * k + i]!;
    outEv[r] = ev[i]!;
    outSkew[r] = Math.abs(skew[i]!);
  }
  return { maps, timecourses: tcs, explainedVariance: outEv, skewness: outSkew, order, flipped };
}
