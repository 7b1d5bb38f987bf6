// Symmetric eigen-decomposition of a small dense matrix on flat Float64Arrays: Householder
// tridiagonalisation (tred2) and implicit QL (tql2) from the public-domain JAMA library (Wilkinson &
// Reinsch, Handbook for Automatic Computation II, 1971; EISPACK), as ported in ml-matrix's
// EigenvalueDecomposition, with its Matrix get/set replaced by flat indexing (the FastICA
// decorrelation calls it every iteration on k × k).

/**
 * Eigen-decomposition A = Σ_l λ_l u_l u_lᵀ of a symmetric n × n matrix (row-major, only read).
 * Returns eigenvalues ascending and the eigenvectors as ROWS of a row-major n × n matrix
 * (vectors[l*n + i] = u_l[i]).
 */
export function symmetricEigen(a: Float64Array, n: number): { values: Float64Array; vectors: Float64Array } {
  // tred2/tql2 work on V stored transposed (V[j*n + i] holds the logical V(i, j)); A is symmetric.
  const V = Float64Array.from(a.subarray(0, n * n));
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  tred2(n, e, d, V);
  tql2(n, e, d, V);
  return { values: d, vectors: V };
}

function tred2(n: number, e: Float64Array, d: Float64Array, V: Float64Array): void {
  let f: number, g: number, h: number, i: number, j: number, k: number, hh: number, scale: number;

  for (j = 0; j < n; j++) {
    d[j] = V[j * n + (n - 1)];
  }

  for (i = n - 1; i > 0; i--) {
    scale = 0;
    h = 0;
    for (k = 0; k < i; k++) {
      scale = scale + Math.abs(d[k]);
    }

    if (scale === 0) {
      e[i] = d[i - 1];
      for (j = 0; j < i; j++) {
        d[j] = V[j * n + (i - 1)];
        V[j * n + i] = 0;
        V[i * n + j] = 0;
      }
    } else {
      for (k = 0; k < i; k++) {
        d[k] /= scale;
        h += d[k] * d[k];
      }

      f = d[i - 1];
      g = Math.sqrt(h);
      if (f > 0) {
        g = -g;
      }

      e[i] = scale * g;
      h = h - f * g;
      d[i - 1] = f - g;
      for (j = 0; j < i; j++) {
        e[j] = 0;
      }

      for (j = 0; j < i; j++) {
        f = d[j];
        V[i * n + j] = f;
        g = e[j] + V[j * n + j] * f;
        for (k = j + 1; k <= i - 1; k++) {
          g += V[j * n + k] * d[k];
          e[k] += V[j * n + k] * f;
        }
        e[j] = g;
      }

      f = 0;
      for (j = 0; j < i; j++) {
        e[j] /= h;
        f += e[j] * d[j];
      }

      hh = f / (h + h);
      for (j = 0; j < i; j++) {
        e[j] -= hh * d[j];
      }

      for (j = 0; j < i; j++) {
        f = d[j];
        g = e[j];
        for (k = j; k <= i - 1; k++) {
          V[j * n + k] = V[j * n + k] - (f * e[k] + g * d[k]);
        }
        d[j] = V[j * n + (i - 1)];
        V[j * n + i] = 0;
      }
    }
    d[i] = h;
  }

  for (i = 0; i < n - 1; i++) {
    V[i * n + (n - 1)] = V[i * n + i];
    V[i * n + i] = 1;
    h = d[i + 1];
    if (h !== 0) {
      for (k = 0; k <= i; k++) {
        d[k] = V[(i + 1) * n + k] / h;
      }

      for (j = 0; j <= i; j++) {
        g = 0;
        for (k = 0; k <= i; k++) {
          g += V[(i + 1) * n + k] * V[j * n + k];
        }
        for (k = 0; k <= i; k++) {
          V[j * n + k] = V[j * n + k] - g * d[k];
        }
      }
    }

    for (k = 0; k <= i; k++) {
      V[(i + 1) * n + k] = 0;
    }
  }

  for (j = 0; j < n; j++) {
    d[j] = V[j * n + (n - 1)];
    V[j * n + (n - 1)] = 0;
  }

  V[(n - 1) * n + (n - 1)] = 1;
  e[0] = 0;
}

function tql2(n: number, e: Float64Array, d: Float64Array, V: Float64Array): void {
  let g: number, h: number, i: number, j: number, k: number, l: number, m: number, p: number, r: number;
  let dl1: number, c: number, c2: number, c3: number, el1: number, s: number, s2: number, iter: number;

  for (i = 1; i < n; i++) {
    e[i - 1] = e[i];
  }

  e[n - 1] = 0;

  let f = 0;
  let tst1 = 0;
  const eps = Number.EPSILON;

  for (l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= eps * tst1) {
        break;
      }
      m++;
    }

    if (m > l) {
      iter = 0;
      do {
        iter = iter + 1;

        g = d[l];
        p = (d[l + 1] - g) / (2 * e[l]);
        r = Math.hypot(p, 1);
        if (p < 0) {
          r = -r;
        }

        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        dl1 = d[l + 1];
        h = g - d[l];
        for (i = l + 2; i < n; i++) {
          d[i] -= h;
        }

        f = f + h;

        p = d[m];
        c = 1;
        c2 = c;
        c3 = c;
        el1 = e[l + 1];
        s = 0;
        s2 = 0;
        for (i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);

          for (k = 0; k < n; k++) {
            h = V[(i + 1) * n + k];
            V[(i + 1) * n + k] = s * V[i * n + k] + c * h;
            V[i * n + k] = c * V[i * n + k] - s * h;
          }
        }

        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }

  for (i = 0; i < n - 1; i++) {
    k = i;
    p = d[i];
    for (j = i + 1; j < n; j++) {
      if (d[j] < p) {
        k = j;
        p = d[j];
      }
    }

    if (k !== i) {
      d[k] = d[i];
      d[i] = p;
      for (j = 0; j < n; j++) {
        p = V[i * n + j];
        V[i * n + j] = V[k * n + j];
        V[k * n + j] = p;
      }
    }
  }
}
