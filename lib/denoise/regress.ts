/**
 * Regression of noise components out of fMRI data (DESIGN.md §6; REFERENCES.md "component
 * regression"). Ordinary least squares per voxel, y = X·β + e, with β = X⁺·y and X⁺ the
 * Moore–Penrose pseudo-inverse of the small T × p design (ml-matrix; p = 1 + regressors).
 *
 * - partial: X = [1, every component time course, extra regressors]; only the part of the fit
 *   carried by the noise components (and the extra regressors) is subtracted, so signal that
 *   shares variance with a noise time course is not taken away with it.
 * - full: X = [1, noise time courses, extra regressors]; everything but the intercept is
 *   subtracted (the noise time courses alone are regressed out).
 * Regressors are centred and the intercept is always fitted and kept, so each voxel keeps its
 * temporal mean.
 *
 * Layouts: time courses and extra regressors are time-major T × k (row t, column c); data given
 * as a matrix is voxel-major V × T (row v is one voxel's time series); the streaming form takes
 * one volume (V values) at a time and holds β voxel-major (V × p).
 */
import { Matrix, pseudoInverse } from 'ml-matrix';

export type RegressionMode = 'partial' | 'full';

export interface DesignInput {
  /** Component time courses, time-major T × k (value of component c + 1 at time t is [t·k + c]). */
  timecourses: Float32Array | Float64Array;
  T: number;
  k: number;
  /** 1-based component numbers to remove. */
  noise: readonly number[];
  mode: RegressionMode;
  /** Extra nuisance regressors (e.g. the six motion parameters), time-major T × m; always removed. */
  extra?: { values: Float32Array | Float64Array; m: number; names?: string[] };
}

export interface Design {
  T: number;
  /** Number of columns of X (intercept included). */
  p: number;
  /** The design, time-major T × p. */
  X: Float64Array;
  /** X⁺, p × T row-major (row j gives β_j = Σ_t X⁺[j,t]·y_t). */
  pinv: Float64Array;
  /** Columns of X whose fitted part is subtracted. */
  remove: Int32Array;
  /** Column names, e.g. intercept, component_3, motion_1. */
  columns: string[];
}

export class RegressionError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'RegressionError';
  }
}

/** Builds the design matrix and its pseudo-inverse for a mode and a noise list. */
export function buildDesign(input: DesignInput): Design {
  const { T, k, mode } = input;
  if (input.timecourses.length !== T * k)
    throw new RegressionError(`The time courses hold ${input.timecourses.length} values; T × k = ${T} × ${k} needs ${T * k}.`);
  const noise = [...new Set(input.noise)].sort((a, b) => a - b);
  for (const n of noise) {
    if (!Number.isInteger(n) || n < 1 || n > k) throw new RegressionError(`Component ${n} is not between 1 and ${k}.`);
  }
  const comps = mode === 'partial' ? Array.from({ length: k }, (_, c) => c + 1) : noise;
  const m = input.extra?.m ?? 0;
  if (input.extra && input.extra.values.length !== T * m)
    throw new RegressionError(`The extra regressors hold ${input.extra.values.length} values; T × m = ${T} × ${m} needs ${T * m}.`);
  const p = 1 + comps.length + m;
  if (p > T) throw new RegressionError(`${p} regressors cannot be fitted to ${T} time points.`);
  const X = new Float64Array(T * p);
  const columns = [
    'intercept',
    ...comps.map((c) => `component_${c}`),
    ...Array.from({ length: m }, (_, j) => input.extra?.names?.[j] ?? `extra_${j + 1}`),
  ];
  for (let t = 0; t < T; t++) {
    const row = t * p;
    X[row] = 1;
    for (let j = 0; j < comps.length; j++) X[row + 1 + j] = input.timecourses[t * k + comps[j]! - 1]!;
    for (let j = 0; j < m; j++) X[row + 1 + comps.length + j] = input.extra!.values[t * m + j]!;
  }
  // Centre every regressor so the intercept carries each voxel's temporal mean, which is kept.
  for (let j = 1; j < p; j++) {
    let mean = 0;
    for (let t = 0; t < T; t++) mean += X[t * p + j]!;
    mean /= T;
    for (let t = 0; t < T; t++) X[t * p + j] -= mean;
  }
  const noiseSet = new Set(noise);
  const remove: number[] = [];
  comps.forEach((c, j) => {
    if (noiseSet.has(c)) remove.push(1 + j);
  });
  for (let j = 0; j < m; j++) remove.push(1 + comps.length + j);

  const rows: number[][] = [];
  for (let t = 0; t < T; t++) rows.push(Array.from(X.subarray(t * p, (t + 1) * p)));
  const P = pseudoInverse(new Matrix(rows)); // p × T
  const pinv = new Float64Array(p * T);
  for (let j = 0; j < p; j++) for (let t = 0; t < T; t++) pinv[j * T + t] = P.get(j, t);
  return { T, p, X, pinv, remove: Int32Array.from(remove), columns };
}

/**
 * Regresses every voxel of a voxel-major V × T matrix: returns the cleaned data (same layout),
 * y − Σ_{j ∈ remove} X[:,j]·β_j per voxel.
 */
export function regressVoxelMajor(Y: Float32Array | Float64Array, V: number, design: Design): Float32Array {
  const { T, p, X, pinv, remove } = design;
  if (Y.length !== V * T) throw new RegressionError(`The data hold ${Y.length} values; V × T = ${V} × ${T} needs ${V * T}.`);
  const out = new Float32Array(V * T);
  const beta = new Float64Array(p);
  for (let v = 0; v < V; v++) {
    const off = v * T;
    beta.fill(0);
    for (let j = 0; j < p; j++) {
      let s = 0;
      const row = j * T;
      for (let t = 0; t < T; t++) s += pinv[row + t]! * Y[off + t]!;
      beta[j] = s;
    }
    for (let t = 0; t < T; t++) {
      let fit = 0;
      for (let r = 0; r < remove.length; r++) fit += X[t * p + remove[r]!]! * beta[remove[r]!]!;
      out[off + t] = Y[off + t]! - fit;
    }
  }
  return out;
}

/**
 * The same regression fed one volume at a time, for data too large to hold as a V × T matrix:
 * pass 1 calls accumulate(t, volume) for every t (β += X⁺[:,t]·y_t, so β is complete after the
 * last volume); pass 2 calls apply(t, volume, out). Memory: V × p doubles for β.
 */
export class VolumeRegression {
  readonly beta: Float64Array;
  private readonly seen: Uint8Array;
  private readonly column: Float64Array;
  private complete = false;

  constructor(
    readonly design: Design,
    readonly V: number,
  ) {
    this.beta = new Float64Array(V * design.p);
    this.seen = new Uint8Array(design.T);
    this.column = new Float64Array(design.p);
  }

  /** Adds volume t (V values of the regressed voxels) to β. */
  accumulate(t: number, volume: Float32Array | Float64Array): void {
    const { p, T, pinv } = this.design;
    if (volume.length !== this.V) throw new RegressionError(`Volume ${t} has ${volume.length} voxels; expected ${this.V}.`);
    if (this.seen[t]) throw new RegressionError(`Volume ${t} was accumulated twice.`);
    this.seen[t] = 1;
    const col = this.column;
    for (let j = 0; j < p; j++) col[j] = pinv[j * T + t]!;
    const beta = this.beta;
    for (let v = 0; v < this.V; v++) {
      const y = volume[v]!;
      const base = v * p;
      for (let j = 0; j < p; j++) beta[base + j] += col[j]! * y;
    }
  }

  /** Writes the cleaned volume t into out (length V); every volume must have been accumulated. */
  apply(t: number, volume: Float32Array | Float64Array, out: Float32Array): Float32Array {
    if (!this.complete) this.complete = this.seen.every((s) => s === 1);
    if (!this.complete) throw new RegressionError('Every volume must be accumulated before the regression is applied.');
    const { p, X, remove } = this.design;
    const xrow = t * p;
    const beta = this.beta;
    for (let v = 0; v < this.V; v++) {
      let fit = 0;
      const base = v * p;
      for (let r = 0; r < remove.length; r++) fit += X[xrow + remove[r]!]! * beta[base + remove[r]!]!;
      out[v] = volume[v]! - fit;
    }
    return out;
  }
}
