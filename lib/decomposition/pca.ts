// Eigen-decomposition of the small T × T temporal covariance, sorted by eigenvalue.
import { symmetricEigen } from './eigen-symmetric';

export interface TemporalPca {
  /** Eigenvalues, descending, clipped at 0 (length T), in data units². */
  eigenvalues: Float64Array;
  /** Eigenvectors as rows: row i (length T) is the i-th temporal principal pattern, unit norm. */
  vectors: Float64Array;
  T: number;
}

/**
 * Symmetric eigen-decomposition of a T × T covariance (row-major Float64Array) by Householder
 * tridiagonalisation and implicit QL (eigen-symmetric.ts, the JAMA/EISPACK lineage); returns
 * eigenvalues in descending order and the matching eigenvectors as rows (T × T, row-major).
 */
export function temporalPca(cov: Float64Array, T: number): TemporalPca {
  const { values, vectors: vecs } = symmetricEigen(cov, T);
  const order = Array.from(values, (_, i) => i).sort((i, j) => values[j]! - values[i]!);
  const eigenvalues = new Float64Array(T);
  const vectors = new Float64Array(T * T);
  order.forEach((src, dst) => {
    eigenvalues[dst] = Math.max(0, values[src]!);
    vectors.set(vecs.subarray(src * T, (src + 1) * T), dst * T);
  });
  return { eigenvalues, vectors, T };
}
