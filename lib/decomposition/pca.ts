// Eigen-decomposition of the small T × T temporal covariance (ml-matrix), sorted by eigenvalue.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

export interface TemporalPca {
  /** Eigenvalues, descending, clipped at 0 (length T), in data units². */
  eigenvalues: Float64Array;
  /** Eigenvectors as rows: row i (length T) is the i-th temporal principal pattern, unit norm. */
  vectors: Float64Array;
  T: number;
}

/**
 * Symmetric eigen-decomposition of a T × T covariance (row-major Float64Array) with ml-matrix's
 * EigenvalueDecomposition (tridiagonal QL, from the JAMA/EISPACK lineage); returns eigenvalues in
 * descending order and the matching eigenvectors as rows (T × T, row-major).
 */
export function temporalPca(cov: Float64Array, T: number): TemporalPca {
  const rows: number[][] = [];
  for (let a = 0; a < T; a++) rows.push(Array.from(cov.subarray(a * T, (a + 1) * T)));
  const evd = new EigenvalueDecomposition(new Matrix(rows), { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  const vecs = evd.eigenvectorMatrix;
  const order = values.map((_, i) => i).sort((i, j) => values[j]! - values[i]!);
  const eigenvalues = new Float64Array(T);
  const vectors = new Float64Array(T * T);
  order.forEach((src, dst) => {
    eigenvalues[dst] = Math.max(0, values[src]!);
    for (let t = 0; t < T; t++) vectors[dst * T + t] = vecs.get(t, src);
  });
  return { eigenvalues, vectors, T };
}
