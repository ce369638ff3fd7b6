import { getBackend } from '../linalg';
import type { LinearAlgebraBackend } from '../linalg/backend';
import { structuredKernelsFor, type StructuredKernels } from './nativeKernels';

/**
 * The 2D Pauli–Jordan operator applied to vectors without ever forming a matrix.
 *
 * In light-cone coordinates u = (t+x)/√2, v = (t−x)/√2 the order is i ≺ j iff u_i < u_j and v_i < v_j
 * (server/engine/README.md §1), so (Cᵀw)_x = Σ_{y≺x} w_y is a two-dimensional dominance sum: sweep the elements in
 * increasing u and keep the already-swept weights in a Fenwick (binary indexed) tree over the rank of v;
 * the sum over y ≺ x is a prefix query below v_x. Each product costs O(N log N) time and O(N) memory.
 */

/** Something that applies a real antisymmetric operator: output = Δ · input (input is not modified). */
export interface SkewOperator {
  readonly size: number;
  apply(input: Float64Array, output: Float64Array): void;
  /**
   * output = Δ · input for `width` vectors at once, both size × width column-major (optional: a
   * block eigensolver falls back to `apply` per column).
   */
  applyBlock?(input: Float64Array, output: Float64Array, width: number): void;
}

/** The sweep order of a 2D point set: elements by increasing u, grouped by equal u, and dense v ranks. */
export interface LightConeSweep {
  size: number;
  /** element labels in increasing u */
  byU: Int32Array;
  /** byU[groupStart[g]] … byU[groupStart[g+1]−1] share one u value (length groups + 1) */
  groupStart: Int32Array;
  /** 1-based dense rank of v (equal v share a rank) */
  vRank: Int32Array;
  /** number of distinct v values */
  vRanks: number;
}

/**
 * Sorts a 2D point set for the dominance sweep. Uses t + x and t − x (the light-cone coordinates up to
 * the common factor 1/√2, which does not change any comparison).
 */
export function lightConeSweep(t: ArrayLike<number>, x: ArrayLike<number>): LightConeSweep {
  const size = t.length;
  if (x.length !== size) throw new Error(`t and x must have the same length (got ${size} and ${x.length})`);
  const u = new Float64Array(size);
  const v = new Float64Array(size);
  for (let i = 0; i < size; i++) {
    const ti = t[i];
    const xi = x[i];
    if (!Number.isFinite(ti) || !Number.isFinite(xi)) throw new Error(`element ${i} has a non-finite coordinate`);
    u[i] = ti + xi;
    v[i] = ti - xi;
  }
  const byU = Int32Array.from({ length: size }, (_, i) => i).sort((a, b) => u[a] - u[b]);
  const starts: number[] = [];
  for (let p = 0; p < size; p++) if (p === 0 || u[byU[p]] !== u[byU[p - 1]]) starts.push(p);
  starts.push(size);
  const byV = Int32Array.from({ length: size }, (_, i) => i).sort((a, b) => v[a] - v[b]);
  const vRank = new Int32Array(size);
  let rank = 0;
  for (let p = 0; p < size; p++) {
    if (p === 0 || v[byV[p]] !== v[byV[p - 1]]) rank++;
    vRank[byV[p]] = rank;
  }
  return { size, byU, groupStart: Int32Array.from(starts), vRank, vRanks: rank };
}

/**
 * One sweep of the retarded (or, with `future`, advanced) dominance sum with optional massive
 * substitution. With c = 0 it returns sums[x] = Σ_{y≺x} w_y (Cᵀw). With c > 0 it solves
 * (I + c·Cᵀ) z = w by forward substitution in the sweep order — legitimate because the system is unit
 * lower triangular in any order respecting ≺ (server/engine/README.md §4) — and returns sums = Cᵀz. `future`
 * mirrors everything: Cw and (I + c·C) z = w.
 *
 * Elements with equal u are never related, so each group is queried before any of it is inserted.
 */
export function dominanceSweep(
  sweep: LightConeSweep,
  w: Float64Array,
  sums: Float64Array,
  c: number,
  future: boolean,
  tree: Float64Array = new Float64Array(sweep.vRanks + 1),
): void {
  const { byU, groupStart, vRank, vRanks } = sweep;
  tree.fill(0);
  const groups = groupStart.length - 1;
  for (let gi = 0; gi < groups; gi++) {
    const g = future ? groups - 1 - gi : gi;
    const begin = groupStart[g];
    const end = groupStart[g + 1];
    for (let p = begin; p < end; p++) {
      const e = byU[p];
      let s = 0;
      if (future) {
        // suffix over ranks > r: mirrored index R + 1 − r, prefix strictly below it
        for (let i = vRanks - vRank[e]; i > 0; i -= i & -i) s += tree[i];
      } else {
        for (let i = vRank[e] - 1; i > 0; i -= i & -i) s += tree[i];
      }
      sums[e] = s;
    }
    for (let p = begin; p < end; p++) {
      const e = byU[p];
      const z = w[e] - c * sums[e];
      for (let i = future ? vRanks + 1 - vRank[e] : vRank[e]; i <= vRanks; i += i & -i) tree[i] += z;
    }
  }
}

/**
 * dominanceSweep for `width` interleaved lanes in sweep order: w[p·width + lane] is lane `lane` of the
 * element at sweep position p, `ranks[p]` its v rank; sums come back in the same layout.
 */
function blockSweep(
  ranks: Int32Array,
  groupStart: Int32Array,
  vRanks: number,
  w: Float64Array,
  sums: Float64Array,
  c: number,
  future: boolean,
  width: number,
  tree: Float64Array,
): void {
  tree.fill(0);
  const groups = groupStart.length - 1;
  const z = new Float64Array(width);
  for (let gi = 0; gi < groups; gi++) {
    const g = future ? groups - 1 - gi : gi;
    const begin = groupStart[g];
    const end = groupStart[g + 1];
    for (let p = begin; p < end; p++) {
      const base = p * width;
      for (let i = future ? vRanks - ranks[p] : ranks[p] - 1; i > 0; i -= i & -i) {
        const node = i * width;
        for (let lane = 0; lane < width; lane++) sums[base + lane] += tree[node + lane];
      }
    }
    for (let p = begin; p < end; p++) {
      const base = p * width;
      for (let lane = 0; lane < width; lane++) z[lane] = w[base + lane] - c * sums[base + lane];
      for (let i = future ? vRanks + 1 - ranks[p] : ranks[p]; i <= vRanks; i += i & -i) {
        const node = i * width;
        for (let lane = 0; lane < width; lane++) tree[node + lane] += z[lane];
      }
    }
  }
}

export interface PauliJordan2DOptions {
  /** field mass m ≥ 0 (default 0) */
  mass?: number;
  /** sprinkling density ρ; required when mass > 0 */
  density?: number;
  /**
   * the linear-algebra backend the run uses: when native, blocks of vectors go through the addon's
   * sweep (native/src/structured.cc); null or ml-matrix keeps the JavaScript sweep (default: the best available)
   */
  backend?: LinearAlgebraBackend | null;
}

/**
 * Δ = K − Kᵀ for the 2D retarded Green function of Johnston 2008 (CQG 25 202001): K = ½Cᵀ massless,
 * K_m = ½Cᵀ(I + (m²/2ρ)Cᵀ)⁻¹ massive (server/engine/README.md §4). K_m·w = ½·Cᵀz with (I + cCᵀ)z = w, and
 * K_mᵀ·w = ½·Cz' with (I + cC)z' = w, c = m²/(2ρ): two sweeps per product, the substitution and the
 * dominance sum done together.
 */
export class PauliJordan2D implements SkewOperator {
  readonly size: number;
  readonly substitution: number;
  private readonly past: Float64Array;
  private readonly futureSums: Float64Array;
  private readonly tree: Float64Array;
  private readonly kernels: StructuredKernels | null;

  constructor(
    readonly sweep: LightConeSweep,
    options: PauliJordan2DOptions = {},
  ) {
    const mass = options.mass ?? 0;
    if (!(mass >= 0) || !Number.isFinite(mass)) throw new Error(`mass must be a finite number ≥ 0 (got ${mass})`);
    if (mass > 0 && !(options.density !== undefined && options.density > 0 && Number.isFinite(options.density))) {
      throw new Error('a massive Green function needs the sprinkling density (a positive number)');
    }
    this.size = sweep.size;
    this.substitution = mass > 0 ? (mass * mass) / (2 * options.density!) : 0;
    this.past = new Float64Array(this.size);
    this.futureSums = new Float64Array(this.size);
    this.tree = new Float64Array(sweep.vRanks + 1);
    this.kernels = structuredKernelsFor(options.backend === undefined ? getBackend() : options.backend);
  }

  /** output = K·input (the retarded Green function applied to a vector) */
  applyRetarded(input: Float64Array, output: Float64Array): void {
    dominanceSweep(this.sweep, input, output, this.substitution, false, this.tree);
    for (let i = 0; i < this.size; i++) output[i] *= 0.5;
  }

  /**
   * Δ on `width` vectors at once. The vectors are gathered into sweep order with the lanes of one
   * element side by side, so the sweep reads memory in order and each Fenwick node serves every lane
   * from one cache line; the two sweeps then cost little more than for one vector.
   */
  applyBlock(input: Float64Array, output: Float64Array, width: number): void {
    const n = this.size;
    if (!(Number.isInteger(width) && width >= 1) || input.length !== n * width || output.length !== n * width) {
      throw new Error(`a block of ${width} vectors needs ${n * width} entries`);
    }
    const { byU } = this.sweep;
    if (this.kernels) {
      this.kernels.structuredApplyBlock(byU, this.sortedRanks(), this.sweep.groupStart, this.sweep.vRanks, this.substitution, width, input, output);
      return;
    }
    const sorted = new Float64Array(n * width);
    for (let lane = 0; lane < width; lane++) {
      const offset = lane * n;
      for (let p = 0; p < n; p++) sorted[p * width + lane] = input[offset + byU[p]];
    }
    const past = new Float64Array(n * width);
    const future = new Float64Array(n * width);
    const tree = new Float64Array((this.sweep.vRanks + 1) * width);
    const ranks = this.sortedRanks();
    blockSweep(ranks, this.sweep.groupStart, this.sweep.vRanks, sorted, past, this.substitution, false, width, tree);
    blockSweep(ranks, this.sweep.groupStart, this.sweep.vRanks, sorted, future, this.substitution, true, width, tree);
    for (let lane = 0; lane < width; lane++) {
      const offset = lane * n;
      for (let p = 0; p < n; p++) output[offset + byU[p]] = 0.5 * (past[p * width + lane] - future[p * width + lane]);
    }
  }

  private ranksInSweepOrder: Int32Array | null = null;

  private sortedRanks(): Int32Array {
    if (!this.ranksInSweepOrder) {
      const { byU, vRank } = this.sweep;
      this.ranksInSweepOrder = Int32Array.from(byU, (e) => vRank[e]);
    }
    return this.ranksInSweepOrder;
  }

  apply(input: Float64Array, output: Float64Array): void {
    if (input.length !== this.size || output.length !== this.size) {
      throw new Error(`vector length must be ${this.size}`);
    }
    dominanceSweep(this.sweep, input, this.past, this.substitution, false, this.tree);
    dominanceSweep(this.sweep, input, this.futureSums, this.substitution, true, this.tree);
    for (let i = 0; i < this.size; i++) output[i] = 0.5 * (this.past[i] - this.futureSums[i]);
  }
}

/** The operator for flat 2D points (t, x per element), the layout of a sprinkling. */
export function pauliJordan2DFromPoints(points: ArrayLike<number>, options: PauliJordan2DOptions = {}): PauliJordan2D {
  if (points.length % 2 !== 0) throw new Error(`2D points need t, x per element (got ${points.length} numbers)`);
  const n = points.length / 2;
  const t = new Float64Array(n);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = points[2 * i];
    x[i] = points[2 * i + 1];
  }
  return new PauliJordan2D(lightConeSweep(t, x), options);
}
