import type { LinearAlgebraBackend } from '../linalg/backend';
import type { Basis } from './basis';
import { structuredKernelsFor } from './nativeKernels';

/** a second Gram–Schmidt pass when a pass removed more than this share of a column's norm (DGKS, common practice) */
const REORTHOGONALISE_BELOW = Math.SQRT1_2;

/** Euclidean norm of each column of a column-major size × width block */
export function columnNorms(w: Float64Array, size: number, width: number): Float64Array {
  const norms = new Float64Array(width);
  for (let lane = 0; lane < width; lane++) {
    let s = 0;
    const off = lane * size;
    for (let i = 0; i < size; i++) s += w[off + i] * w[off + i];
    norms[lane] = Math.sqrt(s);
  }
  return norms;
}

/**
 * Block classical Gram–Schmidt of W = ΔV_i against the basis. The large components (along V_i and
 * V_i−1, the three-term relation) are removed first against those 2b columns alone, twice; what is
 * left along older vectors is rounding-sized, so one pass against the whole basis is normally enough and
 * a second runs only when a column lost most of its norm (DGKS, common practice). `recent` is a copy of
 * the basis's last `recentWidth` columns (column-major size × recentWidth). W (column-major size × width)
 * is orthogonalised in place; returns Vᵀ(ΔV_i) accumulated over the passes (count × width), whose rows
 * of the newest block are H_i.
 */
export function orthogonaliseBlock(basis: Basis, w: Float64Array, width: number, recent: Float64Array, recentWidth: number, backend: LinearAlgebraBackend | null): Float64Array {
  const n = basis.size;
  const m = basis.count;
  const local = new Float64Array(recentWidth * width);
  for (let pass = 0; pass < 2; pass++) {
    const c = denseProject(recent, recentWidth, w, width, n, backend);
    denseSubtract(recent, recentWidth, c, w, width, n, backend);
    for (let i = 0; i < c.length; i++) local[i] += c[i];
  }
  let before = columnNorms(w, n, width);
  const total = new Float64Array(m * width);
  for (let lane = 0; lane < width; lane++) for (let r = 0; r < recentWidth; r++) total[m - recentWidth + r + lane * m] += local[r + lane * recentWidth];
  for (let pass = 0; pass < 3; pass++) {
    const c = basis.project(w, width);
    basis.subtract(c, w, width);
    for (let i = 0; i < c.length; i++) total[i] += c[i];
    const after = columnNorms(w, n, width);
    let again = false;
    for (let lane = 0; lane < width; lane++) if (after[lane] <= REORTHOGONALISE_BELOW * before[lane]) again = true;
    if (!again) break;
    before = after;
  }
  return total;
}

/** Aᵀ W for column-major n × ca A and n × width W */
function denseProject(a: Float64Array, ca: number, w: Float64Array, width: number, n: number, backend: LinearAlgebraBackend | null): Float64Array {
  const kernels = structuredKernelsFor(backend);
  if (kernels) {
    const out = new Float64Array(ca * width);
    kernels.basisProject(n, ca, width, a, w, n, 0, out);
    return out;
  }
  if (backend) return backend.multiply({ rows: n, cols: ca, data: a }, { rows: n, cols: width, data: w }, { transposeA: true }).data;
  const c = new Float64Array(ca * width);
  for (let lane = 0; lane < width; lane++) {
    for (let j = 0; j < ca; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += a[j * n + i] * w[lane * n + i];
      c[j + lane * ca] = s;
    }
  }
  return c;
}

/** W −= A C */
function denseSubtract(a: Float64Array, ca: number, c: Float64Array, w: Float64Array, width: number, n: number, backend: LinearAlgebraBackend | null): void {
  const kernels = structuredKernelsFor(backend);
  if (kernels) {
    kernels.basisUpdate(n, ca, width, a, c, w, n, 0, -1, 1);
    return;
  }
  if (backend) {
    const part = backend.multiply({ rows: n, cols: ca, data: a }, { rows: ca, cols: width, data: c }).data;
    for (let i = 0; i < part.length; i++) w[i] -= part[i];
    return;
  }
  for (let lane = 0; lane < width; lane++) {
    for (let j = 0; j < ca; j++) {
      const h = c[j + lane * ca];
      for (let i = 0; i < n; i++) w[lane * n + i] -= h * a[j * n + i];
    }
  }
}
