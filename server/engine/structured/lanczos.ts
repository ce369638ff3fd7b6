import seedrandom from 'seedrandom';
import type { SkewOperator } from './dominance2d';
import { columnDots, combineColumns, subtractCombination } from './kernels';
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
}

const DEFAULT_TOLERANCE = 1e-10;
const DEFAULT_GUARD = 3;
/** a second Gram–Schmidt pass when a pass removed more than this share of the norm (DGKS criterion, common practice) */
/** β below this share of ‖Δ‖ means the Krylov space is invariant */
const INVARIANT_RELATIVE = 1e-13;
const REORTHOGONALISE_BELOW = Math.SQRT1_2;

class Basis {
  readonly columns: Float64Array[] = [];
  private readonly dots: Float64Array;
  constructor(
    readonly size: number,
    capacity: number,
  ) {
    this.dots = new Float64Array(capacity);
  }

  /** Orthogonalises w against every stored column (classical Gram–Schmidt, repeated when needed) and returns ‖w‖. */
  orthogonalise(w: Float64Array): number {
    const count = this.columns.length;
    let before = norm(w);
    for (let pass = 0; pass < 3 && count > 0; pass++) {
      columnDots(this.columns, count, w, this.dots, 0, this.size);
      subtractCombination(this.columns, count, this.dots, w, 0, this.size);
      const after = norm(w);
      if (after > REORTHOGONALISE_BELOW * before) return after;
      before = after;
    }
    return norm(w);
  }

  push(w: Float64Array, scale: number): void {
    const inv = 1 / scale;
    for (let i = 0; i < w.length; i++) w[i] *= inv;
    this.columns.push(w);
  }
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

  const basis = new Basis(n, 2 * maxSteps + 2);
  const rightColumns: number[] = [];
  const leftColumns: number[] = [];
  const alpha: number[] = [];
  const beta: number[] = [];
  let products = 0;

  const start = new Float64Array(n);
  for (let i = 0; i < n; i++) start[i] = random() - 0.5;
  basis.push(start, norm(start));
  rightColumns.push(0);

  let steps = 0;
  let nextCheck = 8;
  let summary: RitzSummary | null = null;
  let finished = false;
  let wantedCount = 0;
  let scale = 0;
  while (!finished) {
    // left vector: α_j q_j = Δ p_j − β_{j−1} q_{j−1}
    const p = basis.columns[rightColumns[steps]];
    const q = new Float64Array(n);
    op.apply(p, q);
    products++;
    if (steps > 0) {
      const prev = basis.columns[leftColumns[steps - 1]];
      const b = beta[steps - 1];
      for (let i = 0; i < n; i++) q[i] -= b * prev[i];
    }
    const a = basis.orthogonalise(q);
    alpha.push(a);
    basis.push(q, a);
    leftColumns.push(basis.columns.length - 1);
    // right vector: β_j p_{j+1} = Δᵀ q_j − α_j p_j = −Δ q_j − α_j p_j
    const r = new Float64Array(n);
    op.apply(q, r);
    products++;
    for (let i = 0; i < n; i++) r[i] = -r[i] - a * p[i];
    steps++;
    const bNorm = basis.orthogonalise(r);
    scale = Math.max(scale, a, bNorm);
    const invariant = bNorm <= INVARIANT_RELATIVE * scale;
    const exhausted = steps >= maxSteps || basis.columns.length >= n;
    beta.push(invariant ? 0 : bNorm);
    if (!invariant && !exhausted) {
      basis.push(r, bNorm);
      rightColumns.push(basis.columns.length - 1);
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
      else if (invariant || basis.columns.length >= n) finished = true;
      else if (exhausted) {
        throw new Error(`the eigensolver did not converge in ${steps} steps (${converged} of ${need} triplets converged)`);
      }
      nextCheck = steps + Math.max(8, Math.ceil(steps / 20));
    }
  }
  const final = summary as RitzSummary;
  const keep = count ?? final.sigma.filter((s) => s > (cut as number)).length;
  if (keep > final.sigma.length) throw new Error(`only ${final.sigma.length} nonzero pairs exist; asked for ${keep}`);
  const triplets = formTriplets(basis, alpha, beta, steps, final.sigma.subarray(0, keep), rightColumns, leftColumns, random);
  return { size: n, sigma: Float64Array.from(final.sigma.subarray(0, keep)), ...triplets, relativeResiduals: Float64Array.from(final.relativeResiduals.subarray(0, keep)), steps, products };
}

/** a_i = P y_i, b_i = Q x_i from the Jordan–Wielandt eigenvectors (y, x interleaved, scaled by 1/√2). */
function formTriplets(
  basis: Basis,
  alpha: number[],
  beta: number[],
  steps: number,
  sigma: Float64Array,
  rightColumns: number[],
  leftColumns: number[],
  random: () => number,
): { a: Float64Array[]; b: Float64Array[] } {
  const k = sigma.length;
  const m = 2 * steps;
  const vectors = tridiagonalEigenvectors(new Float64Array(m), jordanWielandtOffDiagonal(alpha, beta, steps), sigma, random);
  const right = new Float64Array(steps * k);
  const left = new Float64Array(steps * k);
  for (let c = 0; c < k; c++) {
    for (let j = 0; j < steps; j++) {
      right[j + c * steps] = Math.SQRT2 * vectors[2 * j + c * m];
      left[j + c * steps] = Math.SQRT2 * vectors[2 * j + 1 + c * m];
    }
  }
  const n = basis.size;
  const a = Array.from({ length: k }, () => new Float64Array(n));
  const b = Array.from({ length: k }, () => new Float64Array(n));
  combineColumns(basis.columns, Int32Array.from(rightColumns.slice(0, steps)), right, k, a, 0, n);
  combineColumns(basis.columns, Int32Array.from(leftColumns.slice(0, steps)), left, k, b, 0, n);
  return { a, b };
}
