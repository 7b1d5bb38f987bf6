// Reproducibility of ICA components across restarts: cluster the estimates of several FastICA runs by
// |spatial correlation|, keep each cluster's most central estimate, and score each cluster
// (Himberg, Hyvärinen & Esposito 2004, NeuroImage 22:1214).

export interface EstimateClusters {
  /** k × k row-major: row c is cluster c's centrotype (an estimated unmixing row, unit norm). */
  centrotypes: Float64Array;
  /** Reproducibility index per cluster, 0–1 (see clusterEstimates). */
  index: Float64Array;
  /** Number of estimates in each cluster (R for a source found once by every restart). */
  sizes: Int32Array;
  /** Mean |similarity| between different members of each cluster (NaN for a single member). */
  intra: Float64Array;
  /** Mean |similarity| between each cluster's members and all other estimates. */
  extra: Float64Array;
}

/**
 * Clusters R restarts' unmixing matrices (each k × k, row-major, orthonormal rows, in the same
 * whitened space) into k clusters. Because the whitened data Z satisfy Z·Zᵀ/V = I, the spatial
 * correlation of the sources s_a = w_a·Z and s_b = w_b·Z is the dot product w_a·w_b, so the
 * similarity matrix σ_ab = |w_a·w_b| needs no voxel data. Clustering: agglomerative, group-average
 * linkage on σ, merged until k clusters remain (Himberg et al. 2004, §2.2). Centrotype of a cluster:
 * the member with the largest summed similarity to the other members (ibid.). Reproducibility index:
 * Himberg's quality index I_q = mean intra-cluster σ − mean σ between members and non-members, with
 * the intra mean taken over max(|C|, R)·(max(|C|, R) − 1) ordered pairs of distinct members — a
 * cluster missing some restarts' estimates counts those as similarity 0 — and clamped to [0, 1].
 * A source found alike by every restart scores near 1; a component that fits noise differently on
 * every restart scores low. Deterministic: ties break on the lower index.
 */
export function clusterEstimates(estimates: Float64Array[], k: number): EstimateClusters {
  const R = estimates.length;
  const n = R * k;
  const rows = (i: number) => estimates[Math.floor(i / k)]!.subarray((i % k) * k, ((i % k) + 1) * k);
  const sim = new Float64Array(n * n);
  for (let a = 0; a < n; a++) {
    const wa = rows(a);
    sim[a * n + a] = 1;
    for (let b = a + 1; b < n; b++) {
      const wb = rows(b);
      let d = 0;
      for (let l = 0; l < k; l++) d += wa[l]! * wb[l]!;
      sim[a * n + b] = sim[b * n + a] = Math.min(1, Math.abs(d));
    }
  }
  // Group-average linkage: link(A, B) = mean σ over A × B, updated by the Lance–Williams rule.
  const link = Float64Array.from(sim);
  const size = new Int32Array(n).fill(1);
  const alive = new Uint8Array(n).fill(1);
  const parent = Int32Array.from({ length: n }, (_, i) => i);
  let clusters = n;
  while (clusters > k) {
    let best = -Infinity,
      ba = -1,
      bb = -1;
    for (let a = 0; a < n; a++) {
      if (!alive[a]) continue;
      for (let b = a + 1; b < n; b++) {
        if (!alive[b]) continue;
        const v = link[a * n + b]!;
        if (v > best) {
          best = v;
          ba = a;
          bb = b;
        }
      }
    }
    const sa = size[ba]!,
      sb = size[bb]!;
    for (let c = 0; c < n; c++) {
      if (!alive[c] || c === ba || c === bb) continue;
      const v = (sa * link[ba * n + c]! + sb * link[bb * n + c]!) / (sa + sb);
      link[ba * n + c] = link[c * n + ba] = v;
    }
    alive[bb] = 0;
    size[ba] = sa + sb;
    for (let i = 0; i < n; i++) if (parent[i] === bb) parent[i] = ba;
    clusters--;
  }
  const roots: number[] = [];
  for (let a = 0; a < n; a++) if (alive[a]) roots.push(a);
  const centrotypes = new Float64Array(k * k);
  const index = new Float64Array(k);
  const sizes = new Int32Array(k);
  const intra = new Float64Array(k);
  const extra = new Float64Array(k);
  roots.forEach((root, c) => {
    const members: number[] = [];
    for (let i = 0; i < n; i++) if (parent[i] === root) members.push(i);
    let bestSum = -Infinity,
      centre = members[0]!;
    let inSum = 0;
    for (const a of members) {
      let s = 0;
      for (const b of members) if (b !== a) s += sim[a * n + b]!;
      inSum += s;
      if (s > bestSum) {
        bestSum = s;
        centre = a;
      }
    }
    let outSum = 0;
    const inSet = new Uint8Array(n);
    for (const a of members) inSet[a] = 1;
    for (const a of members) for (let b = 0; b < n; b++) if (!inSet[b]) outSum += sim[a * n + b]!;
    const m = members.length;
    const pairs = Math.max(m, R) * (Math.max(m, R) - 1);
    const intraMean = pairs > 0 ? inSum / pairs : 0;
    const extraMean = n > m ? outSum / (m * (n - m)) : 0;
    sizes[c] = m;
    intra[c] = m > 1 ? inSum / (m * (m - 1)) : NaN;
    extra[c] = extraMean;
    index[c] = Math.min(1, Math.max(0, intraMean - extraMean));
    centrotypes.set(rows(centre), c * k);
  });
  return { centrotypes, index, sizes, intra, extra };
}

/**
 * For each row of w (k × k, the final unmixing matrix), the cluster whose centrotype it is most
 * similar to (|dot|), and that similarity — how the final, polished components inherit their
 * clusters' reproducibility. Returns cluster indices and similarities, length k.
 */
export function matchToCentrotypes(
  w: Float64Array,
  centrotypes: Float64Array,
  k: number,
): { cluster: Int32Array; similarity: Float64Array } {
  const cluster = new Int32Array(k);
  const similarity = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    let best = -1,
      bc = 0;
    for (let c = 0; c < k; c++) {
      let d = 0;
      for (let l = 0; l < k; l++) d += w[i * k + l]! * centrotypes[c * k + l]!;
      if (Math.abs(d) > best) {
        best = Math.abs(d);
        bc = c;
      }
    }
    cluster[i] = bc;
    similarity[i] = best;
  }
  return { cluster, similarity };
}
