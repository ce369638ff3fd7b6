import { CholeskyDecomposition, EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type {
  DenseMatrix,
  LinearAlgebraBackend,
  SymmetricEigenOptions,
  SymmetricEigenResult,
  TriangularSolveOptions,
} from './backend';

export function denseMatrix(rows: number, cols: number, data?: Float64Array): DenseMatrix {
  if (data && data.length !== rows * cols) throw new RangeError(`expected ${rows * cols} entries, got ${data.length}`);
  return { rows, cols, data: data ?? new Float64Array(rows * cols) };
}

function transposed(a: DenseMatrix): DenseMatrix {
  const t = denseMatrix(a.cols, a.rows);
  for (let j = 0; j < a.cols; j++) for (let i = 0; i < a.rows; i++) t.data[j + i * a.cols] = a.data[i + j * a.rows];
  return t;
}

/** C = A B for column-major A, B: each column of C is a sum of columns of A (unit-stride inner loop). */
function multiplyPlain(a: DenseMatrix, b: DenseMatrix): DenseMatrix {
  if (a.cols !== b.rows) throw new RangeError(`cannot multiply ${a.rows}×${a.cols} by ${b.rows}×${b.cols}`);
  const m = a.rows;
  const c = denseMatrix(m, b.cols);
  const ad = a.data;
  const bd = b.data;
  const cd = c.data;
  const inner = a.cols;
  const bRows = b.rows;
  for (let j = 0; j < b.cols; j++) {
    const cj = j * m;
    for (let k = 0; k < inner; k++) {
      const bkj = bd[k + j * bRows];
      if (bkj === 0) continue;
      const ak = k * m;
      for (let i = 0; i < m; i++) cd[cj + i] += ad[ak + i] * bkj;
    }
  }
  return c;
}

/** C = Aᵀ B: every entry is a dot product of two contiguous columns. */
function multiplyTransposeA(a: DenseMatrix, b: DenseMatrix): DenseMatrix {
  if (a.rows !== b.rows) throw new RangeError(`cannot multiply (${a.rows}×${a.cols})ᵀ by ${b.rows}×${b.cols}`);
  const n = a.rows;
  const c = denseMatrix(a.cols, b.cols);
  const ad = a.data;
  const bd = b.data;
  const cd = c.data;
  const m = a.cols;
  for (let j = 0; j < b.cols; j++) {
    const bj = j * n;
    for (let i = 0; i < m; i++) {
      const ai = i * n;
      let s = 0;
      for (let k = 0; k < n; k++) s += ad[ai + k] * bd[bj + k];
      cd[i + j * m] = s;
    }
  }
  return c;
}

/** ml-matrix Matrix of the symmetric matrix whose lower triangle `a` holds. */
function symmetricMatrixFromLower(a: DenseMatrix): Matrix {
  const n = a.rows;
  const m = new Matrix(n, n);
  for (let j = 0; j < n; j++) {
    for (let i = j; i < n; i++) {
      const v = a.data[i + j * n];
      m.set(i, j, v);
      m.set(j, i, v);
    }
  }
  return m;
}

/**
 * Dense linear algebra on ml-matrix: its symmetric eigensolver (Householder tridiagonalisation and
 * implicit QL, the EISPACK tred2/tql2 pair as in JAMA) and Cholesky factorisation; products, Gram
 * matrices and triangular substitution are plain column-major loops over the same storage.
 */
export const mlMatrixBackend: LinearAlgebraBackend = {
  name: 'ml-matrix',

  symmetricEigen(a: DenseMatrix, options: SymmetricEigenOptions = {}): SymmetricEigenResult {
    const n = a.rows;
    if (a.cols !== n) throw new RangeError('symmetricEigen needs a square matrix');
    if (n === 0) return { values: new Float64Array(0), vectors: options.vectors === false ? null : denseMatrix(0, 0) };
    const evd = new EigenvalueDecomposition(symmetricMatrixFromLower(a), { assumeSymmetric: true });
    const all = evd.realEigenvalues;
    const order = Array.from(all.keys()).sort((p, q) => all[p] - all[q]);
    const kept = options.above === undefined ? order : order.filter((k) => all[k] > (options.above as number));
    const values = Float64Array.from(kept, (k) => all[k]);
    if (options.vectors === false) return { values, vectors: null };
    const vectors = denseMatrix(n, kept.length);
    const v = evd.eigenvectorMatrix;
    kept.forEach((k, col) => {
      for (let i = 0; i < n; i++) vectors.data[i + col * n] = v.get(i, k);
    });
    return { values, vectors };
  },

  multiply(a, b, options = {}) {
    if (options.transposeA && options.transposeB) return transposed(multiplyPlain(b, a));
    if (options.transposeA) return multiplyTransposeA(a, b);
    if (options.transposeB) return multiplyPlain(a, transposed(b));
    return multiplyPlain(a, b);
  },

  gram(a) {
    const n = a.rows;
    const m = a.cols;
    const g = denseMatrix(m, m);
    const ad = a.data;
    const gd = g.data;
    for (let j = 0; j < m; j++) {
      const aj = j * n;
      for (let i = 0; i <= j; i++) {
        const ai = i * n;
        let s = 0;
        for (let k = 0; k < n; k++) s += ad[ai + k] * ad[aj + k];
        gd[i + j * m] = s;
        gd[j + i * m] = s;
      }
    }
    return g;
  },

  solveTriangular(t, b, options: TriangularSolveOptions) {
    const n = t.rows;
    if (t.cols !== n || b.rows !== n) throw new RangeError('solveTriangular: T must be square and match B');
    const x = denseMatrix(n, b.cols, Float64Array.from(b.data));
    const td = t.data;
    const unit = options.unitDiagonal === true;
    // Tᵀ of a lower T is upper and vice versa; the dot-product forms read columns of T contiguously
    const forwardAxpy = options.lower && !options.transpose;
    const backwardAxpy = !options.lower && !options.transpose;
    for (let j = 0; j < b.cols; j++) {
      const xd = x.data.subarray(j * n, (j + 1) * n);
      if (forwardAxpy) {
        for (let k = 0; k < n; k++) {
          if (!unit) xd[k] /= td[k + k * n];
          const xk = xd[k];
          if (xk === 0) continue;
          for (let i = k + 1; i < n; i++) xd[i] -= td[i + k * n] * xk;
        }
      } else if (backwardAxpy) {
        for (let k = n - 1; k >= 0; k--) {
          if (!unit) xd[k] /= td[k + k * n];
          const xk = xd[k];
          if (xk === 0) continue;
          for (let i = 0; i < k; i++) xd[i] -= td[i + k * n] * xk;
        }
      } else if (options.lower) {
        for (let k = n - 1; k >= 0; k--) {
          let s = xd[k];
          for (let i = k + 1; i < n; i++) s -= td[i + k * n] * xd[i];
          xd[k] = unit ? s : s / td[k + k * n];
        }
      } else {
        for (let k = 0; k < n; k++) {
          let s = xd[k];
          for (let i = 0; i < k; i++) s -= td[i + k * n] * xd[i];
          xd[k] = unit ? s : s / td[k + k * n];
        }
      }
    }
    return x;
  },
  cholesky(a) {
    const n = a.rows;
    if (a.cols !== n) throw new RangeError(`cholesky needs a square matrix, got ${a.rows}×${a.cols}`);
    if (n === 0) return denseMatrix(0, 0);
    const decomposition = new CholeskyDecomposition(symmetricMatrixFromLower(a));
    if (!decomposition.isPositiveDefinite()) return null;
    const l = decomposition.lowerTriangularMatrix;
    const out = denseMatrix(n, n);
    for (let j = 0; j < n; j++) for (let i = j; i < n; i++) out.data[i + j * n] = l.get(i, j);
    return out;
  },
};
