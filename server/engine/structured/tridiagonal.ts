/**
 * Symmetric tridiagonal eigenproblems of the Lanczos projections: eigenvalues by the implicit QL
 * algorithm (EISPACK tql1/tql2, Bowdler–Martin–Reinsch–Wilkinson 1968, as in JAMA), optionally tracking
 * one row of the accumulated rotations (the last components that give Lanczos residuals) in O(n²);
 * eigenvectors of selected eigenvalues by inverse iteration (as LAPACK dstein: tridiagonal LU with
 * partial pivoting, re-orthogonalisation inside clusters of close eigenvalues).
 */

/**
 * Eigenvalues of the symmetric tridiagonal with diagonal `diagonal` and off-diagonal
 * `offDiagonal[i]` = T[i][i+1] (length n − 1), ascending; with `lastRow` also the last component of
 * each unit eigenvector (same order).
 */
export function tridiagonalEigenvalues(
  diagonal: Float64Array,
  offDiagonal: Float64Array,
  lastRow = false,
): { values: Float64Array; lastComponents: Float64Array | null } {
  const n = diagonal.length;
  const d = Float64Array.from(diagonal);
  const e = new Float64Array(n);
  e.set(offDiagonal.subarray(0, Math.max(0, n - 1)));
  const z = lastRow ? new Float64Array(n) : null;
  if (z && n > 0) z[n - 1] = 1;
  let f = 0;
  let tst1 = 0;
  const eps = 2 ** -52;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= eps * tst1) break;
      m++;
    }
    if (m === n) m = n - 1;
    if (m > l) {
      let iterations = 0;
      do {
        if (++iterations > 100) throw new Error('tridiagonal QL did not converge');
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
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
          if (z) {
            const zh = z[i + 1];
            z[i + 1] = s * z[i] + c * zh;
            z[i] = c * z[i] - s * zh;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] += f;
    e[l] = 0;
  }
  const order = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => d[a] - d[b]);
  return {
    values: Float64Array.from(order, (i) => d[i]),
    lastComponents: z ? Float64Array.from(order, (i) => z[i]) : null,
  };
}

/** LU factors of T − λI with partial pivoting (LAPACK dgttrf layout). */
interface TridiagonalLu {
  lower: Float64Array;
  diag: Float64Array;
  upper: Float64Array;
  upper2: Float64Array;
  swapped: Uint8Array;
}

function factorShifted(diagonal: Float64Array, offDiagonal: Float64Array, shift: number, tiny: number): TridiagonalLu {
  const n = diagonal.length;
  const lower = new Float64Array(Math.max(0, n - 1));
  const diag = new Float64Array(n);
  const upper = new Float64Array(Math.max(0, n - 1));
  const upper2 = new Float64Array(Math.max(0, n - 2));
  const swapped = new Uint8Array(Math.max(0, n - 1));
  for (let i = 0; i < n; i++) diag[i] = diagonal[i] - shift;
  lower.set(offDiagonal.subarray(0, n - 1));
  upper.set(offDiagonal.subarray(0, n - 1));
  for (let i = 0; i < n - 1; i++) {
    if (Math.abs(diag[i]) >= Math.abs(lower[i])) {
      if (diag[i] === 0) diag[i] = tiny;
      const fact = lower[i] / diag[i];
      lower[i] = fact;
      diag[i + 1] -= fact * upper[i];
    } else {
      const fact = diag[i] / lower[i];
      diag[i] = lower[i];
      lower[i] = fact;
      const temp = upper[i];
      upper[i] = diag[i + 1];
      diag[i + 1] = temp - fact * diag[i + 1];
      if (i < n - 2) {
        upper2[i] = upper[i + 1];
        upper[i + 1] = -fact * upper[i + 1];
      }
      swapped[i] = 1;
    }
  }
  for (let i = 0; i < n; i++) if (Math.abs(diag[i]) < tiny) diag[i] = diag[i] < 0 ? -tiny : tiny;
  return { lower, diag, upper, upper2, swapped };
}

function solveShifted(lu: TridiagonalLu, b: Float64Array): void {
  const n = b.length;
  for (let i = 0; i < n - 1; i++) {
    if (lu.swapped[i]) {
      const temp = b[i];
      b[i] = b[i + 1];
      b[i + 1] = temp - lu.lower[i] * b[i];
    } else {
      b[i + 1] -= lu.lower[i] * b[i];
    }
  }
  b[n - 1] /= lu.diag[n - 1];
  if (n > 1) b[n - 2] = (b[n - 2] - lu.upper[n - 2] * b[n - 1]) / lu.diag[n - 2];
  for (let i = n - 3; i >= 0; i--) b[i] = (b[i] - lu.upper[i] * b[i + 1] - lu.upper2[i] * b[i + 2]) / lu.diag[i];
}

/** Eigenvalues closer than this (relative to the larger magnitude) are treated as one cluster. */
const CLUSTER_RELATIVE_GAP = 1e-3;
const INVERSE_ITERATIONS = 3;

/**
 * Unit eigenvectors (each of length n, in a flat array n × values.length, column-major) of the
 * tridiagonal for the given eigenvalues, which must be sorted by magnitude or value so that members of
 * a cluster are adjacent.
 */
export function tridiagonalEigenvectors(
  diagonal: Float64Array,
  offDiagonal: Float64Array,
  values: Float64Array,
  random: () => number,
): Float64Array {
  const n = diagonal.length;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    norm = Math.max(norm, Math.abs(diagonal[i]) + (i > 0 ? Math.abs(offDiagonal[i - 1]) : 0) + (i < n - 1 ? Math.abs(offDiagonal[i]) : 0));
  }
  const tiny = 2 ** -52 * Math.max(norm, Number.MIN_VALUE);
  const out = new Float64Array(n * values.length);
  let clusterStart = 0;
  for (let j = 0; j < values.length; j++) {
    const lambda = values[j];
    if (j > 0 && Math.abs(lambda - values[j - 1]) > CLUSTER_RELATIVE_GAP * Math.max(Math.abs(lambda), Math.abs(values[j - 1]))) clusterStart = j;
    const lu = factorShifted(diagonal, offDiagonal, lambda, tiny);
    const x = out.subarray(j * n, (j + 1) * n);
    for (let i = 0; i < n; i++) x[i] = random() - 0.5;
    for (let it = 0; it < INVERSE_ITERATIONS; it++) {
      solveShifted(lu, x);
      for (let c = clusterStart; c < j; c++) {
        const y = out.subarray(c * n, (c + 1) * n);
        let dot = 0;
        for (let i = 0; i < n; i++) dot += x[i] * y[i];
        for (let i = 0; i < n; i++) x[i] -= dot * y[i];
      }
      let s = 0;
      for (let i = 0; i < n; i++) s += x[i] * x[i];
      const inv = 1 / Math.sqrt(s);
      for (let i = 0; i < n; i++) x[i] *= inv;
    }
  }
  return out;
}
