/**
 * L2-regularised (ridge) logistic regression, fitted by Newton–Raphson (iteratively reweighted least
 * squares) over ml-matrix.
 *
 * Minimises Σᵢ [−yᵢ log pᵢ − (1 − yᵢ) log(1 − pᵢ)] + ½ λ ‖w‖², pᵢ = σ(b + xᵢ·w), y ∈ {0, 1}, the
 * intercept b unpenalised. With λ = 1/C this is the objective of scikit-learn's
 * LogisticRegression(penalty='l2', C) (its user guide, "Logistic regression": C·Σ loss + ½‖w‖²),
 * so the coefficients match it (tests/unit/suggestions-logistic.test.ts, fixture made by
 * scripts/reference/make-suggestion-fixtures.py).
 * Newton step: H = Xᵀ W X + λ·diag(0, 1, …, 1), g = Xᵀ(p − y) + λ·(0, w), with W = diag(p(1 − p)) and
 * X carrying a leading column of ones. The objective is strictly convex for λ > 0, so the iteration
 * converges; a step that does not lower the objective is halved (at most 30 times).
 */
import { Matrix, solve } from 'ml-matrix';

export type LogisticModel = { intercept: number; coefficients: number[] };

const sigmoid = (z: number): number => (z >= 0 ? 1 / (1 + Math.exp(-z)) : Math.exp(z) / (1 + Math.exp(z)));

function objective(X: number[][], y: readonly number[], beta: number[], lambda: number): number {
  let s = 0;
  for (let i = 0; i < X.length; i++) {
    let z = beta[0]!;
    const row = X[i]!;
    for (let j = 0; j < row.length; j++) z += row[j]! * beta[j + 1]!;
    // log(1 + e^z) − y·z, computed stably
    s += (z > 0 ? z + Math.log1p(Math.exp(-z)) : Math.log1p(Math.exp(z))) - y[i]! * z;
  }
  for (let j = 1; j < beta.length; j++) s += 0.5 * lambda * beta[j]! ** 2;
  return s;
}

/** Fits the model. X: n rows × d columns (plain numbers); y: 0/1 per row; lambda = 1/C > 0. */
export function fitLogistic(X: number[][], y: readonly number[], lambda: number, maxIter = 100, tol = 1e-10): LogisticModel {
  const n = X.length;
  if (n === 0) throw new Error('No training rows.');
  if (!(lambda > 0)) throw new Error('lambda must be positive.');
  const d = X[0]!.length;
  let beta = new Array<number>(d + 1).fill(0);
  let f = objective(X, y, beta, lambda);
  for (let iter = 0; iter < maxIter; iter++) {
    const H = Matrix.zeros(d + 1, d + 1);
    const g = new Array<number>(d + 1).fill(0);
    const xi = new Array<number>(d + 1);
    for (let i = 0; i < n; i++) {
      xi[0] = 1;
      const row = X[i]!;
      let z = beta[0]!;
      for (let j = 0; j < d; j++) {
        xi[j + 1] = row[j]!;
        z += row[j]! * beta[j + 1]!;
      }
      const p = sigmoid(z);
      const w = p * (1 - p);
      const r = p - y[i]!;
      for (let a = 0; a <= d; a++) {
        g[a]! += r * xi[a]!;
        const wa = w * xi[a]!;
        for (let b = a; b <= d; b++) H.set(a, b, H.get(a, b) + wa * xi[b]!);
      }
    }
    for (let a = 0; a <= d; a++) for (let b = 0; b < a; b++) H.set(a, b, H.get(b, a));
    for (let j = 1; j <= d; j++) {
      g[j]! += lambda * beta[j]!;
      H.set(j, j, H.get(j, j) + lambda);
    }
    const step = solve(H, Matrix.columnVector(g)).to1DArray();
    let t = 1;
    let next = beta.map((b, j) => b - t * step[j]!);
    let fn = objective(X, y, next, lambda);
    for (let h = 0; h < 30 && fn > f; h++) {
      t /= 2;
      next = beta.map((b, j) => b - t * step[j]!);
      fn = objective(X, y, next, lambda);
    }
    const change = Math.max(...step.map((s) => Math.abs(s * t)));
    beta = next;
    const done = Math.abs(f - fn) <= tol * Math.max(1, Math.abs(f)) && change < 1e-8;
    f = fn;
    if (done) break;
  }
  return { intercept: beta[0]!, coefficients: beta.slice(1) };
}

/** P(y = 1) for each row. */
export function predictLogistic(model: LogisticModel, X: number[][]): number[] {
  return X.map((row) => {
    let z = model.intercept;
    for (let j = 0; j < row.length; j++) z += row[j]! * model.coefficients[j]!;
    return sigmoid(z);
  });
}
