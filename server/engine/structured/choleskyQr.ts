import type { LinearAlgebraBackend } from '../linalg/backend';
import type { Basis } from './basis';
import { structuredKernelsFor } from './nativeKernels';

/** a column of the new block below this share of ‖Δ‖ means the Krylov space is invariant in that direction */
export const INVARIANT_RELATIVE = 1e-13;

/**
 * W = Q G with Q orthonormal (column-major size × width, in place) and G upper triangular (width × width,
 * column-major), by Cholesky QR done twice (common practice: the second pass restores orthogonality to
 * rounding). A column that is (numerically) in the span of the basis and the earlier columns is
 * replaced by a random unit vector orthogonal to both, with a zero column in G — the Krylov space is
 * then continued from a fresh direction; `invariant` says it happened for every column.
 */
export function blockQr(
  basis: Basis,
  w: Float64Array,
  width: number,
  scale: number,
  random: () => number,
  backend: LinearAlgebraBackend | null,
): { g: Float64Array; invariant: boolean } {
  const n = basis.size;
  const g = new Float64Array(width * width);
  g.fill(0);
  for (let i = 0; i < width; i++) g[i + i * width] = 1;
  let replaced = 0;
  for (let pass = 0; pass < 2; pass++) {
    const gram = backend ? backend.gram({ rows: n, cols: width, data: w }).data : plainGram(w, n, width);
    const r = cholesky(gram, width, INVARIANT_RELATIVE * INVARIANT_RELATIVE * scale * scale * (pass === 0 ? 1 : 0));
    if (r === null) {
      // rank deficient: orthonormalise column by column, replacing the dependent columns
      const rc = columnwiseQr(basis, w, width, scale, random);
      replaced = rc.replaced;
      return { g: multiplyUpper(rc.r, g, width), invariant: replaced === width };
    }
    const kernels = structuredKernelsFor(backend);
    if (kernels) kernels.solveUpperRight(n, width, w, r);
    else solveUpperFromRight(w, n, width, r);
    const combined = multiplyUpper(r, g, width);
    g.set(combined);
  }
  return { g, invariant: false };
}

function plainGram(w: Float64Array, n: number, width: number): Float64Array {
  const out = new Float64Array(width * width);
  for (let a = 0; a < width; a++) {
    for (let b = 0; b <= a; b++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += w[a * n + i] * w[b * n + i];
      out[a + b * width] = s;
      out[b + a * width] = s;
    }
  }
  return out;
}

/** Upper R with RᵀR = A (column-major), or null when a pivot is ≤ `floor` (a dependent column) */
export function cholesky(a: Float64Array, width: number, floor: number): Float64Array | null {
  const r = new Float64Array(width * width);
  for (let j = 0; j < width; j++) {
    let d = a[j + j * width];
    for (let k = 0; k < j; k++) d -= r[k + j * width] * r[k + j * width];
    if (!(d > floor) || !(d > 0)) return null;
    const pivot = Math.sqrt(d);
    r[j + j * width] = pivot;
    for (let i = j + 1; i < width; i++) {
      let s = a[j + i * width];
      for (let k = 0; k < j; k++) s -= r[k + j * width] * r[k + i * width];
      r[j + i * width] = s / pivot;
    }
  }
  return r;
}

/** W ← W R⁻¹ row by row (R upper triangular, column-major) */
function solveUpperFromRight(w: Float64Array, n: number, width: number, r: Float64Array): void {
  const row = new Float64Array(width);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < width; j++) {
      let s = w[j * n + i];
      for (let k = 0; k < j; k++) s -= row[k] * r[k + j * width];
      row[j] = s / r[j + j * width];
    }
    for (let j = 0; j < width; j++) w[j * n + i] = row[j];
  }
}

/** A·B for upper triangular width × width matrices (column-major) */
function multiplyUpper(a: Float64Array, b: Float64Array, width: number): Float64Array {
  const out = new Float64Array(width * width);
  for (let j = 0; j < width; j++) for (let k = 0; k <= j; k++) for (let i = 0; i <= k; i++) out[i + j * width] += a[i + k * width] * b[k + j * width];
  return out;
}

/** Modified Gram–Schmidt with reorthogonalisation against the basis, replacing dependent columns. */
function columnwiseQr(basis: Basis, w: Float64Array, width: number, scale: number, random: () => number): { r: Float64Array; replaced: number } {
  const n = basis.size;
  const r = new Float64Array(width * width);
  let replaced = 0;
  for (let j = 0; j < width; j++) {
    const column = w.subarray(j * n, (j + 1) * n);
    for (let attempt = 0; attempt < 3; attempt++) {
      for (let pass = 0; pass < 2; pass++) {
        for (let k = 0; k < j; k++) {
          const other = w.subarray(k * n, (k + 1) * n);
          let s = 0;
          for (let i = 0; i < n; i++) s += other[i] * column[i];
          for (let i = 0; i < n; i++) column[i] -= s * other[i];
          if (attempt === 0) r[k + j * width] += s;
        }
        if (attempt > 0 || pass > 0) {
          const c = basis.project(column, 1);
          basis.subtract(c, column, 1);
        }
      }
      let s = 0;
      for (let i = 0; i < n; i++) s += column[i] * column[i];
      const length = Math.sqrt(s);
      if (length > INVARIANT_RELATIVE * scale * (attempt === 0 ? 1 : 1e-3)) {
        if (attempt === 0) r[j + j * width] = length;
        for (let i = 0; i < n; i++) column[i] /= length;
        break;
      }
      // dependent: start this column afresh from a random direction (its G column stays zero)
      if (attempt === 0) {
        replaced++;
        for (let k = 0; k < j; k++) r[k + j * width] = 0;
      }
      for (let i = 0; i < n; i++) column[i] = random() - 0.5;
      scale = Math.max(scale, 1);
    }
  }
  return { r, replaced };
}
