import seedrandom from 'seedrandom';
import type { SkewOperator } from './dominance2d';
import type { LinearAlgebraBackend } from '../linalg/backend';
import { getBackend } from '../linalg';
import { combineColumns } from './kernels';
import { tridiagonalEigenvalues, tridiagonalEigenvectors } from './tridiagonal';

/**
 * The top singular triplets of a real antisymmetric Δ by Golub–Kahan–Lanczos bidiagonalisation
 * (Golub & Kahan 1965) with full reorthogonalisation.
 *
 * Why this Krylov method: Δᵀ = −Δ, so Golub–Kahan on Δ is the skew-symmetric Lanczos process. Each σ of
 * iΔ is a double singular value of Δ (ΔᵀΔ has σ² twice, physics notes §4), and the Krylov space of
 * ΔᵀΔ from one start vector holds one vector of each 2-dimensional eigenspace; its partner comes out on
 * the other side of the bidiagonalisation: Δ v = σ u with u ⊥ v and Δ u = −σ v. So every ± pair of iΔ
 * arrives as one triplet (σ, v, u), never duplicated and never missing a partner. Every new vector is
 * orthogonalised against both sides of the basis (in exact arithmetic they are orthogonal; without
 * this, rounding lets a partner u re-enter the right-hand space and σ appears twice).
 *
 * Ritz values are the positive eigenvalues of the Jordan–Wielandt form of the bidiagonal B (a symmetric
 * tridiagonal with zero diagonal and off-diagonals α₁, β₁, α₂, β₂, …), which gives σ to full relative
 * accuracy instead of squaring it. Residual of a Ritz triplet: ‖Δᵀu − σv‖ = β_m |x_m| (Golub & Van Loan,
 * Matrix Computations §10.4, common practice); a triplet is converged when this is ≤ tolerance·σ.
 */
export interface SkewPairs {
  size: number;
  /** σ_1 ≥ σ_2 ≥ … > 0 */
  sigma: Float64Array;
  /** unit vectors a_i (column i), Δ a_i = σ_i b_i */
  a: Float64Array[];
  /** unit vectors b_i ⊥ a_i, Δ b_i = −σ_i a_i */
  b: Float64Array[];
  /** ‖Δᵀ b_i − σ_i a_i‖ / σ_i from the bidiagonalisation */
  relativeResiduals: Float64Array;
  steps: number;
  products: number;
}

export interface LanczosProgress {
  steps: number;
  products: number;
  /** triplets wanted so far (above the cut, or the asked count) */
  wanted: number;
  /** of those, converged */
  converged: number;
}

export interface TopPairsOptions {
  /** keep triplets with σ > cut (give this or `count`) */
  cut?: number;
  /** keep the `count` largest triplets */
  count?: number;
  /** relative residual for convergence (default 1e-10) */
  tolerance?: number;
  /** converged triplets required beyond the wanted ones before stopping (default 3) */
  guard?: number;
  /** Golub–Kahan steps allowed (default: the dimension allows, ≤ ⌊size/2⌋) */
  maxSteps?: number;
  /** seed of the start vector and inverse iteration (default 'tacet-lanczos') */
  seed?: string;
  onProgress?: (progress: LanczosProgress) => void;
  /** dense backend for the block products (default: the best available; null: plain JavaScript kernels) */
  backend?: LinearAlgebraBackend | null;
  /** a guess of the number of pairs that will be kept, to size the basis storage up front */
  expectedPairs?: number;
}

const DEFAULT_TOLERANCE = 1e-10;
const DEFAULT_GUARD = 3;
/** a second Gram–Schmidt pass when a pass removed more than this share of the norm (DGKS criterion, common practice) */
/** β below this share of ‖Δ‖ means the Krylov space is invariant */
const INVARIANT_RELATIVE = 1e-13;
const REORTHOGONALISE_BELOW = Math.SQRT1_2;

const ROW_BLOCK = 8192;

/**
 * Lanczos vectors stored in row blocks: block b holds rows [b·ROW_BLOCK, …) of every column, column-major
 * with room for `capacity` columns, so the first `count` columns of a block are one contiguous matrix.
 * Gram–Schmidt against the basis is then two matrix–vector products per block, done by the dense
 * backend (BLAS dgemv-shaped dgemm when native) or by the flat JavaScript kernels.
 */
class Basis {
  count = 0;
  private capacity: number;
  private blocks: Float64Array[];
  private readonly starts: number[] = [];

  constructor(
    readonly size: number,
    initialCapacity: number,
    private readonly backend: LinearAlgebraBackend | null,
  ) {
    this.capacity = Math.max(4, initialCapacity);
    this.blocks = [];
    for (let r = 0; r < size; r += ROW_BLOCK) {
      this.starts.push(r);
      this.blocks.push(new Float64Array(Math.min(ROW_BLOCK, size - r) * this.capacity));
    }
  }

  private rows(b: number): number {
    return Math.min(ROW_BLOCK, this.size - this.starts[b]);
  }

  /** h = Vᵀ w */
  dots(w: Float64Array, h: Float64Array): void {
    h.fill(0, 0, this.count);
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      const start = this.starts[b];
      const block = this.blocks[b];
      if (this.backend) {
        const part = this.backend.multiply(
          { rows, cols: this.count, data: block.subarray(0, rows * this.count) },
          { rows, cols: 1, data: w.subarray(start, start + rows) },
          { transposeA: true },
        ).data;
        for (let j = 0; j < this.count; j++) h[j] += part[j];
      } else {
        for (let j = 0; j < this.count; j++) {
          const off = j * rows;
          let s0 = 0;
          let s1 = 0;
          let i = 0;
          for (; i + 1 < rows; i += 2) {
            s0 += block[off + i] * w[start + i];
            s1 += block[off + i + 1] * w[start + i + 1];
          }
          if (i < rows) s0 += block[off + i] * w[start + i];
          h[j] += s0 + s1;
        }
      }
    }
  }

  /** w −= V h */
  subtract(h: Float64Array, w: Float64Array): void {
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      const start = this.starts[b];
      const block = this.blocks[b];
      if (this.backend) {
        const part = this.backend.multiply(
          { rows, cols: this.count, data: block.subarray(0, rows * this.count) },
          { rows: this.count, cols: 1, data: h.subarray(0, this.count) },
        ).data;
        for (let i = 0; i < rows; i++) w[start + i] -= part[i];
      } else {
        let j = 0;
        for (; j + 3 < this.count; j += 4) {
          const o0 = j * rows;
          const o1 = o0 + rows;
          const o2 = o1 + rows;
          const o3 = o2 + rows;
          const h0 = h[j];
          const h1 = h[j + 1];
          const h2 = h[j + 2];
          const h3 = h[j + 3];
          for (let i = 0; i < rows; i++) w[start + i] -= h0 * block[o0 + i] + h1 * block[o1 + i] + h2 * block[o2 + i] + h3 * block[o3 + i];
        }
        for (; j < this.count; j++) {
          const o = j * rows;
          const hj = h[j];
          for (let i = 0; i < rows; i++) w[start + i] -= hj * block[o + i];
        }
      }
    }
  }

  /** Stores w / scale as the next column (w itself is normalised in place). */
  push(w: Float64Array, scale: number): void {
    const inv = 1 / scale;
    for (let i = 0; i < w.length; i++) w[i] *= inv;
    if (this.count === this.capacity) this.grow();
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      this.blocks[b].set(w.subarray(this.starts[b], this.starts[b] + rows), this.count * rows);
    }
    this.count++;
  }

  private grow(): void {
    const capacity = Math.min(this.size, Math.ceil(this.capacity * 1.5) + 4);
    this.blocks = this.blocks.map((block, b) => {
      const bigger = new Float64Array(this.rows(b) * capacity);
      bigger.set(block);
      return bigger;
    });
    this.capacity = capacity;
  }

  /**
   * out[c] = Σ_j V[:, j] coefficients[j + c·count] for c < outputs (the Ritz vectors), blockwise:
   * one dgemm per row block when native.
   */
  combine(coefficients: Float64Array, outputs: number): Float64Array[] {
    const out = Array.from({ length: outputs }, () => new Float64Array(this.size));
    const m = this.count;
    for (let b = 0; b < this.blocks.length; b++) {
      const rows = this.rows(b);
      const start = this.starts[b];
      const block = this.blocks[b];
      if (this.backend) {
        const part = this.backend.multiply({ rows, cols: m, data: block.subarray(0, rows * m) }, { rows: m, cols: outputs, data: coefficients }).data;
        for (let c = 0; c < outputs; c++) out[c].set(part.subarray(c * rows, (c + 1) * rows), start);
      } else {
        const columns = Array.from({ length: m }, (_, j) => block.subarray(j * rows, (j + 1) * rows));
        const targets = out.map((o) => o.subarray(start, start + rows));
        combineColumns(columns, Int32Array.from({ length: m }, (_, j) => j), coefficients, outputs, targets, 0, rows);
      }
    }
    return out;
  }

  release(): void {
    this.blocks = [];
  }
}

/** Gram–Schmidt of w against both sides of the bidiagonalisation, repeated when a pass removed most of w. */
function orthogonaliseAgainst(bases: Basis[], w: Float64Array, scratch: Float64Array): number {
  let before = norm(w);
  for (let pass = 0; pass < 3; pass++) {
    for (const basis of bases) {
      if (basis.count === 0) continue;
      basis.dots(w, scratch);
      basis.subtract(scratch, w);
    }
    const after = norm(w);
    if (after > REORTHOGONALISE_BELOW * before) return after;
    before = after;
  }
  return norm(w);
}

function norm(w: Float64Array): number {
  let s0 = 0;
  let s1 = 0;
  let i = 0;
  for (; i + 1 < w.length; i += 2) {
    s0 += w[i] * w[i];
    s1 += w[i + 1] * w[i + 1];
  }
  if (i < w.length) s0 += w[i] * w[i];
  return Math.sqrt(s0 + s1);
}

interface RitzSummary {
  /** positive Ritz values, descending */
  sigma: Float64Array;
  /** β_m |x_m| / σ */
  relativeResiduals: Float64Array;
}

function ritzSummary(alpha: number[], beta: number[], steps: number): RitzSummary {
  const n = 2 * steps;
  const diagonal = new Float64Array(n);
  const off = jordanWielandtOffDiagonal(alpha, beta, steps);
  const { values, lastComponents } = tridiagonalEigenvalues(diagonal, off, true);
  const positive = values.filter((v) => v > 0).length;
  const sigma = new Float64Array(positive);
  const relativeResiduals = new Float64Array(positive);
  const betaLast = beta[steps - 1];
  for (let i = 0; i < positive; i++) {
    const idx = n - 1 - i;
    sigma[i] = values[idx];
    // the left vector x is √2 × the even entries of the Jordan–Wielandt eigenvector
    relativeResiduals[i] = (betaLast * Math.SQRT2 * Math.abs((lastComponents as Float64Array)[idx])) / values[idx];
  }
  return { sigma, relativeResiduals };
}

function jordanWielandtOffDiagonal(alpha: number[], beta: number[], steps: number): Float64Array {
  const off = new Float64Array(2 * steps - 1);
  for (let j = 0; j < steps; j++) {
    off[2 * j] = alpha[j];
    if (j < steps - 1) off[2 * j + 1] = beta[j];
  }
  return off;
}

/**
 * Triplets (σ, a, b) of Δ with σ above `cut` (or the `count` largest), by Golub–Kahan–Lanczos with full
 * reorthogonalisation and a residual convergence test. Stops when the wanted triplets and `guard` more
 * below them are converged — a Ritz value only underestimates its singular value (interlacing), so a
 * converged guard below the cut shows no wanted triplet is still hiding there (common practice).
 */
export function topSkewPairs(op: SkewOperator, options: TopPairsOptions): SkewPairs {
  const n = op.size;
  const { cut, count } = options;
  if ((cut === undefined) === (count === undefined)) throw new Error('give exactly one of cut and count');
  if (cut !== undefined && !(cut >= 0 && Number.isFinite(cut))) throw new Error(`cut must be a finite number ≥ 0 (got ${cut})`);
  if (count !== undefined && !(Number.isInteger(count) && count >= 1)) throw new Error(`count must be a positive integer (got ${count})`);
  if (count !== undefined && count > Math.floor(n / 2)) throw new Error(`asked for ${count} pairs; Δ of ${n} elements has at most ${Math.floor(n / 2)}`);
  if (n < 2) throw new Error('Δ needs at least 2 elements');
  const tolerance = options.tolerance ?? DEFAULT_TOLERANCE;
  const guard = options.guard ?? DEFAULT_GUARD;
  const maxSteps = Math.min(Math.floor(n / 2), options.maxSteps ?? Math.floor(n / 2));
  const random = seedrandom(options.seed ?? 'tacet-lanczos');

  const backend = options.backend === undefined ? getBackend() : options.backend;
  const useBackend = backend && backend.name === 'native' ? backend : null;
  const initialColumns = Math.min(maxSteps + 1, options.expectedPairs !== undefined ? Math.ceil(2.2 * options.expectedPairs) + 16 : 64);
  const right = new Basis(n, initialColumns, useBackend);
  const left = new Basis(n, initialColumns, useBackend);
  const both = [right, left];
  const scratch = new Float64Array(maxSteps + 2);
  const alpha: number[] = [];
  const beta: number[] = [];
  let products = 0;

  let p = new Float64Array(n);
  for (let i = 0; i < n; i++) p[i] = random() - 0.5;
  right.push(p, norm(p));
  let previousLeft: Float64Array | null = null;

  let steps = 0;
  let nextCheck = 8;
  let summary: RitzSummary | null = null;
  let finished = false;
  let wantedCount = 0;
  let scale = 0;
  while (!finished) {
    // left vector: α_j q_j = Δ p_j − β_{j−1} q_{j−1}
    const q = new Float64Array(n);
    op.apply(p, q);
    products++;
    if (previousLeft) {
      const b = beta[steps - 1];
      for (let i = 0; i < n; i++) q[i] -= b * previousLeft[i];
    }
    const a = orthogonaliseAgainst(both, q, scratch);
    alpha.push(a);
    left.push(q, a);
    // right vector: β_j p_{j+1} = Δᵀ q_j − α_j p_j = −Δ q_j − α_j p_j
    const r = new Float64Array(n);
    op.apply(q, r);
    products++;
    for (let i = 0; i < n; i++) r[i] = -r[i] - a * p[i];
    steps++;
    const bNorm = orthogonaliseAgainst(both, r, scratch);
    scale = Math.max(scale, a, bNorm);
    const invariant = bNorm <= INVARIANT_RELATIVE * scale;
    const exhausted = steps >= maxSteps || right.count + left.count >= n;
    beta.push(invariant ? 0 : bNorm);
    if (!invariant && !exhausted) {
      right.push(r, bNorm);
      p = r;
      previousLeft = q;
    }
    if (steps >= nextCheck || invariant || exhausted) {
      summary = ritzSummary(alpha, beta, steps);
      const { sigma, relativeResiduals } = summary;
      wantedCount = count ?? sigma.filter((s) => s > (cut as number)).length;
      const need = Math.min(sigma.length, wantedCount + guard);
      let converged = 0;
      while (converged < sigma.length && relativeResiduals[converged] <= tolerance) converged++;
      options.onProgress?.({ steps, products, wanted: wantedCount, converged: Math.min(converged, wantedCount) });
      if ((count === undefined || sigma.length >= count) && converged >= need && need >= wantedCount) finished = true;
      else if (invariant || right.count + left.count >= n) finished = true;
      else if (exhausted) {
        throw new Error(`the eigensolver did not converge in ${steps} steps (${converged} of ${need} triplets converged)`);
      }
      nextCheck = steps + Math.max(8, Math.ceil(steps / 20));
    }
  }
  const final = summary as RitzSummary;
  const keep = count ?? final.sigma.filter((s) => s > (cut as number)).length;
  if (keep > final.sigma.length) throw new Error(`only ${final.sigma.length} nonzero pairs exist; asked for ${keep}`);
  const sigma = Float64Array.from(final.sigma.subarray(0, keep));
  const triplets = formTriplets(right, left, alpha, beta, steps, sigma, random);
  return { size: n, sigma, ...triplets, relativeResiduals: Float64Array.from(final.relativeResiduals.subarray(0, keep)), steps, products };
}

/** a_i = P y_i, b_i = Q x_i from the Jordan–Wielandt eigenvectors (y, x interleaved, scaled by 1/√2). */
function formTriplets(
  right: Basis,
  left: Basis,
  alpha: number[],
  beta: number[],
  steps: number,
  sigma: Float64Array,
  random: () => number,
): { a: Float64Array[]; b: Float64Array[] } {
  const k = sigma.length;
  const m = 2 * steps;
  const vectors = tridiagonalEigenvectors(new Float64Array(m), jordanWielandtOffDiagonal(alpha, beta, steps), sigma, random);
  const rightCoefficients = new Float64Array(right.count * k);
  const leftCoefficients = new Float64Array(left.count * k);
  for (let c = 0; c < k; c++) {
    for (let j = 0; j < steps; j++) {
      if (j < right.count) rightCoefficients[j + c * right.count] = Math.SQRT2 * vectors[2 * j + c * m];
      leftCoefficients[j + c * left.count] = Math.SQRT2 * vectors[2 * j + 1 + c * m];
    }
  }
  const a = right.combine(rightCoefficients, k);
  right.release();
  const b = left.combine(leftCoefficients, k);
  left.release();
  return { a, b };
}
