import type { LinearAlgebraBackend } from '../linalg/backend';
import { combineColumns } from './kernels';
import { structuredKernelsFor, type StructuredKernels } from './nativeKernels';

export const ROW_BLOCK = 8192;

/** How the basis vectors are stored; every sum over them is accumulated in float64 either way. */
export type BasisPrecision = 'float32' | 'float64';

type Storage = Float32Array | Float64Array;

/**
 * Lanczos vectors stored in row blocks: block r holds rows [r·ROW_BLOCK, …) of every column, column-major
 * with room for `capacity` columns, so the first `count` columns of a row block are one contiguous
 * matrix and block Gram–Schmidt is two matrix–matrix products per row block (the native kernels of
 * native/src/structured.cc, else BLAS dgemm, else flat JavaScript loops).
 *
 * With `float32` the vectors are stored rounded to single precision (half the memory and half the
 * memory traffic of the reorthogonalisation, which reads the whole basis twice per block step) while the
 * products, the block being orthogonalised and the two newest blocks stay float64. The three-term
 * relation, and with it T and the σ, is then built from float64 vectors only; the rounded copies serve
 * the full reorthogonalisation, which removes rounding-sized components, so the basis stays orthogonal
 * to about 2⁻²⁴/√N — the semi-orthogonality under which Lanczos keeps its Ritz values to working
 * accuracy (Simon 1984, common practice) — and the Ritz vectors formed from it carry a relative
 * rounding of about 2⁻²⁴. tests/engine/structuredFloat32Basis.test.ts measures what that leaves: σ
 * within 4e-10 and the double-truncated S within 2e-9 of a float64 basis at N = 2000.
 */
export class Basis {
  count = 0;
  private capacity: number;
  private blocks: Storage[];
  private readonly starts: number[] = [];
  private readonly kernels: StructuredKernels | null;

  constructor(
    readonly size: number,
    initialCapacity: number,
    private readonly backend: LinearAlgebraBackend | null,
    readonly precision: BasisPrecision = 'float64',
  ) {
    this.capacity = Math.max(4, Math.min(size, initialCapacity));
    this.kernels = structuredKernelsFor(backend);
    this.blocks = [];
    for (let r = 0; r < size; r += ROW_BLOCK) {
      this.starts.push(r);
      this.blocks.push(this.allocate(Math.min(ROW_BLOCK, size - r) * this.capacity));
    }
  }

  private allocate(length: number): Storage {
    return this.precision === 'float32' ? new Float32Array(length) : new Float64Array(length);
  }

  /** bytes held by the stored vectors */
  get storedBytes(): number {
    let total = 0;
    for (const block of this.blocks) total += block.byteLength;
    return total;
  }

  private rows(b: number): number {
    return Math.min(ROW_BLOCK, this.size - this.starts[b]);
  }

  /** C = Vᵀ W for a column-major size × width W; C is count × width column-major */
  project(w: Float64Array, width: number): Float64Array {
    const m = this.count;
    const c = new Float64Array(m * width);
    if (m === 0) return c;
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      const start = this.starts[b];
      const block = this.blocks[b];
      if (this.kernels) {
        this.kernels.basisProject(rows, m, width, block, w, this.size, start, c);
        continue;
      }
      const slice = gatherRows(w, this.size, width, start, rows);
      if (this.backend && block instanceof Float64Array) {
        const part = this.backend.multiply({ rows, cols: m, data: block.subarray(0, rows * m) }, { rows, cols: width, data: slice }, { transposeA: true }).data;
        for (let i = 0; i < part.length; i++) c[i] += part[i];
      } else {
        for (let lane = 0; lane < width; lane++) {
          const x = lane * rows;
          for (let j = 0; j < m; j++) {
            const off = j * rows;
            let s0 = 0;
            let s1 = 0;
            let i = 0;
            for (; i + 1 < rows; i += 2) {
              s0 += block[off + i] * slice[x + i];
              s1 += block[off + i + 1] * slice[x + i + 1];
            }
            if (i < rows) s0 += block[off + i] * slice[x + i];
            c[j + lane * m] += s0 + s1;
          }
        }
      }
    }
    return c;
  }

  /** W −= V C */
  subtract(c: Float64Array, w: Float64Array, width: number): void {
    const m = this.count;
    if (m === 0) return;
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      const start = this.starts[b];
      const block = this.blocks[b];
      if (this.kernels) {
        this.kernels.basisUpdate(rows, m, width, block, c, w, this.size, start, -1, 1);
        continue;
      }
      if (this.backend && block instanceof Float64Array) {
        const part = this.backend.multiply({ rows, cols: m, data: block.subarray(0, rows * m) }, { rows: m, cols: width, data: c }).data;
        for (let lane = 0; lane < width; lane++) {
          const target = lane * this.size + start;
          const source = lane * rows;
          for (let i = 0; i < rows; i++) w[target + i] -= part[source + i];
        }
      } else {
        for (let lane = 0; lane < width; lane++) {
          const target = lane * this.size + start;
          for (let j = 0; j < m; j++) {
            const h = c[j + lane * m];
            if (h === 0) continue;
            const off = j * rows;
            for (let i = 0; i < rows; i++) w[target + i] -= h * block[off + i];
          }
        }
      }
    }
  }

  /** Appends the columns of a column-major size × width block. */
  push(w: Float64Array, width: number): void {
    while (this.count + width > this.capacity) this.grow();
    for (let lane = 0; lane < width; lane++) {
      for (let b = 0; b < this.blocks.length; b++) {
        const rows = this.rows(b);
        const from = lane * this.size + this.starts[b];
        this.blocks[b].set(w.subarray(from, from + rows), (this.count + lane) * rows);
      }
    }
    this.count += width;
  }

  private grow(): void {
    const capacity = Math.min(this.size, Math.ceil(this.capacity * 1.5) + 16);
    this.blocks = this.blocks.map((block, b) => {
      const bigger = this.allocate(this.rows(b) * capacity);
      bigger.set(block);
      return bigger;
    });
    this.capacity = capacity;
  }

  /**
   * out[c] = Σ_j V[:, j] coefficients[j + c·count] for c < outputs, one row block at a time, each row
   * block of the basis released once used so that the outputs and the basis never both peak. The
   * outputs are columns of one column-major size × outputs matrix (see asOneMatrix).
   */
  combineAndRelease(coefficients: Float64Array, outputs: number): Float64Array[] {
    const matrix = new Float64Array(this.size * outputs);
    const out = Array.from({ length: outputs }, (_, c) => matrix.subarray(c * this.size, (c + 1) * this.size));
    const m = this.count;
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      const start = this.starts[b];
      const block = this.blocks[b];
      if (this.kernels) {
        // through a fresh buffer per row block: each allocation tells V8 of new external memory, which
        // makes it collect the row blocks released before, so that basis and factors do not peak
        // together (2.2 GB at N = 100 000 when the product went straight into the matrix)
        const part = new Float64Array(rows * outputs);
        this.kernels.basisCombine(rows, m, outputs, block, coefficients, part, rows, 0);
        for (let c = 0; c < outputs; c++) matrix.set(part.subarray(c * rows, (c + 1) * rows), c * this.size + start);
      } else if (this.backend && block instanceof Float64Array) {
        const part = this.backend.multiply({ rows, cols: m, data: block.subarray(0, rows * m) }, { rows: m, cols: outputs, data: coefficients }).data;
        for (let c = 0; c < outputs; c++) out[c].set(part.subarray(c * rows, (c + 1) * rows), start);
      } else {
        const columns = Array.from({ length: m }, (_, j) => block.subarray(j * rows, (j + 1) * rows));
        const targets = out.map((o) => o.subarray(start, start + rows));
        combineColumns(columns, Int32Array.from({ length: m }, (_, j) => j), coefficients, outputs, targets, 0, rows);
      }
      this.blocks[b] = this.allocate(0);
    }
    this.count = 0;
    return out;
  }
}

/** rows [start, start + rows) of a column-major size × width matrix, as a contiguous rows × width matrix */
function gatherRows(w: Float64Array, size: number, width: number, start: number, rows: number): Float64Array {
  if (width === 1) return w.subarray(start, start + rows);
  const out = new Float64Array(rows * width);
  for (let lane = 0; lane < width; lane++) out.set(w.subarray(lane * size + start, lane * size + start + rows), lane * rows);
  return out;
}

/**
 * The column-major size × columns.length matrix whose columns are `columns`, without a copy when they
 * are consecutive views of one buffer (as combineAndRelease returns them), else copied into one.
 */
export function asOneMatrix(columns: Float64Array[], size: number): Float64Array {
  const first = columns[0];
  if (!first) return new Float64Array(0);
  const buffer = first.buffer;
  const consecutive = columns.every((c, i) => c.buffer === buffer && c.length === size && c.byteOffset === first.byteOffset + i * size * 8);
  if (consecutive) return new Float64Array(buffer, first.byteOffset, size * columns.length);
  const out = new Float64Array(size * columns.length);
  columns.forEach((c, i) => out.set(c, i * size));
  return out;
}
