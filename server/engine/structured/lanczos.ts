import seedrandom from 'seedrandom';
import type { SkewOperator } from './dominance2d';
import type { LinearAlgebraBackend } from '../linalg/backend';
import { getBackend } from '../linalg';
import { Basis, type BasisPrecision } from './basis';
import { orthogonaliseBlock } from './blockGramSchmidt';
import { blockQr } from './choleskyQr';

/**
 * The top pairs of a real antisymmetric Δ (iΔ has eigenvalues ±σ; Δ a = σ b, Δ b = −σ a with a ⊥ b unit
 * vectors) by block skew-symmetric Lanczos with full reorthogonalisation.
 *
 * The Krylov space of Δ from a block V_0 of `blockSize` random vectors is built with the block
 * three-term relation Δ V_i = V_i+1 G_i + V_i H_i − V_i−1 G_i−1ᵀ: H_i = V_iᵀ Δ V_i is skew, G_i upper
 * triangular from the QR of the new block, so the projection T = VᵀΔV is skew block tridiagonal (the
 * block Lanczos method of Golub & Underwood 1977 applied to a skew operator, where Vᵀ Δ V_i−1 = −G_i−1ᵀ
 * follows from Δᵀ = −Δ). Every σ of iΔ needs a two-dimensional real subspace span{a, b}, which a
 * skew Krylov space builds without duplication (unlike a Krylov space of ΔᵀΔ, where σ² is double and a
 * single vector misses partners). Each new block is orthogonalised against the whole basis by two
 * matrix–matrix products per pass (block classical Gram–Schmidt, a second pass when a column lost most
 * of its norm: Daniel–Gragg–Kaufman–Stewart 1976, common practice), which BLAS runs at compute speed —
 * the reason for blocks: one vector at a time reads the whole basis per vector from memory.
 *
 * Ritz pairs come from the symmetric TᵀT = −T² (each θ² twice): with s_1 a unit vector of the θ²
 * eigenspace, s_2 = T s_1 / θ is its partner and θ = ‖T s_1‖ is recomputed from T itself, which gives θ to
 * rounding relative to ‖T‖ (the eigenvector error enters only squared). Residuals need no products:
 * Δ(V s) − V T s = V_m+1 G_m (last block of s), so ‖Δa − θb‖ = ‖G_m s_1,last‖ and
 * ‖Δb + θa‖ = ‖G_m s_2,last‖ (Golub & Van Loan, Matrix Computations §10.3, common practice); a pair is
 * converged when both are ≤ tolerance·θ.
 */
export interface SkewPairs {
  size: number;
  /** σ_1 ≥ σ_2 ≥ … > 0 */
  sigma: Float64Array;
  /** unit vectors a_i (column i), Δ a_i = σ_i b_i */
  a: Float64Array[];
  /** unit vectors b_i ⊥ a_i, Δ b_i = −σ_i a_i */
  b: Float64Array[];
  /** max(‖Δa_i − σ_i b_i‖, ‖Δb_i + σ_i a_i‖) / σ_i from the Lanczos relation */
  relativeResiduals: Float64Array;
  /** block steps */
  steps: number;
  /** Δ applied to this many vectors */
  products: number;
  /** Krylov dimension at the end */
  dimension: number;
  blockSize: number;
  /** wall seconds spent in: Δ products, Gram–Schmidt and QR, Ritz eigensolves, forming the vectors */
  seconds: { products: number; orthogonalisation: number; ritz: number; vectors: number };
  /** how the basis was stored, and its size at the end in bytes */
  basisPrecision: BasisPrecision;
  basisBytes: number;
}

export interface LanczosProgress {
  /** block steps */
  steps: number;
  products: number;
  dimension: number;
  /** pairs wanted so far (above the cut, or the asked count) */
  wanted: number;
  /** of those, converged */
  converged: number;
}

export interface TopPairsOptions {
  /** keep pairs with σ > cut (give this or `count`) */
  cut?: number;
  /** keep the `count` largest pairs */
  count?: number;
  /** relative residual for convergence (default 1e-10) */
  tolerance?: number;
  /** converged pairs required beyond the wanted ones before stopping (default 3) */
  guard?: number;
  /** largest Krylov dimension allowed (default: the size of Δ) */
  maxDimension?: number;
  /** vectors per block (default 16, fewer for tiny Δ) */
  blockSize?: number;
  /** seed of the start block (default 'tacet-lanczos') */
  seed?: string;
  onProgress?: (progress: LanczosProgress) => void;
  /** dense backend for the block products (default: the best available; null: plain JavaScript kernels) */
  backend?: LinearAlgebraBackend | null;
  /** a guess of the number of pairs that will be kept, to size the basis storage up front */
  expectedPairs?: number;
  /** storage of the Lanczos basis (default: float32 from FLOAT32_BASIS_FROM elements, float64 below) */
  basisPrecision?: BasisPrecision;
}

/**
 * From this size the Lanczos basis is stored in float32 (see the note on Basis in basis.ts): at N = 100 000
 * it is 2700 vectors, 2.2 GB in float64, and the reorthogonalisation reads it twice per block step.
 * Below, memory is no concern and float64 keeps the vectors to full precision.
 */
export const FLOAT32_BASIS_FROM = 20_000;

const DEFAULT_TOLERANCE = 1e-10;
const DEFAULT_GUARD = 3;
const DEFAULT_BLOCK = 16;
/** Krylov growth between convergence checks (each check is one dense eigensolve of TᵀT) */
const CHECK_GROWTH = 1.25;

/** The block-tridiagonal skew T = VᵀΔV, kept as its diagonal blocks H_i and subdiagonal blocks G_i. */
class SkewBlockTridiagonal {
  readonly diagonal: Float64Array[] = [];
  readonly subdiagonal: Float64Array[] = [];
  constructor(readonly width: number) {}

  get dimension(): number {
    return this.diagonal.length * this.width;
  }

  /**
   * TᵀT as a dense symmetric matrix, from the blocks: block column j of T has rows in block rows j − 1 … j + 1
   * only, so (TᵀT)[i, j] is a sum of at most three b × b products and TᵀT is block pentadiagonal;
   * O(m b²) work instead of the O(m³) of a dense Gram product of T.
   */
  gram(): { rows: number; cols: number; data: Float64Array } {
    const b = this.width;
    const blocks = this.diagonal.length;
    const m = blocks * b;
    const out = new Float64Array(m * m);
    // T block (r, c), column-major b × b, or null when zero
    const block = (r: number, c: number): Float64Array | null => {
      if (r === c) return this.diagonal[r];
      if (r === c + 1) return this.subdiagonal[c] ?? null;
      if (c === r + 1) {
        const g = this.subdiagonal[r];
        if (!g) return null;
        const minusTransposed = new Float64Array(b * b);
        for (let x = 0; x < b; x++) for (let y = 0; y < b; y++) minusTransposed[x + y * b] = -g[y + x * b];
        return minusTransposed;
      }
      return null;
    };
    const cache = new Map<number, Float64Array | null>();
    const cached = (r: number, c: number) => {
      const key = r * blocks + c;
      if (!cache.has(key)) cache.set(key, r >= 0 && c >= 0 && r < blocks && c < blocks ? block(r, c) : null);
      return cache.get(key)!;
    };
    for (let j = 0; j < blocks; j++) {
      for (let i = Math.max(0, j - 2); i <= j; i++) {
        // (TᵀT)[i, j] = Σ_k T[k, i]ᵀ T[k, j]
        const sum = new Float64Array(b * b);
        for (let k = j - 1; k <= i + 1; k++) {
          const left = cached(k, i);
          const right = cached(k, j);
          if (!left || !right) continue;
          for (let c = 0; c < b; c++) {
            for (let r = 0; r < b; r++) {
              let s = 0;
              for (let q = 0; q < b; q++) s += left[q + r * b] * right[q + c * b];
              sum[r + c * b] += s;
            }
          }
        }
        for (let c = 0; c < b; c++) {
          for (let r = 0; r < b; r++) {
            out[i * b + r + (j * b + c) * m] = sum[r + c * b];
            out[j * b + c + (i * b + r) * m] = sum[r + c * b];
          }
        }
      }
    }
    return { rows: m, cols: m, data: out };
  }

  /** T s for a vector of length dimension, through the blocks (O(dimension · width)) */
  apply(s: Float64Array): Float64Array {
    const b = this.width;
    const blocks = this.diagonal.length;
    const out = new Float64Array(blocks * b);
    for (let i = 0; i < blocks; i++) {
      const h = this.diagonal[i];
      for (let c = 0; c < b; c++) {
        const x = s[i * b + c];
        for (let r = 0; r < b; r++) out[i * b + r] += h[r + c * b] * x;
      }
      if (i + 1 < blocks) {
        const g = this.subdiagonal[i];
        for (let c = 0; c < b; c++) {
          for (let r = 0; r < b; r++) {
            out[(i + 1) * b + r] += g[r + c * b] * s[i * b + c];
            out[i * b + c] -= g[r + c * b] * s[(i + 1) * b + r];
          }
        }
      }
    }
    return out;
  }
}

interface RitzPairs {
  /** θ of the pairs, descending */
  theta: Float64Array;
  /** unit s_1 of each pair (dimension × pairs, column-major) */
  vectors: Float64Array;
  relativeResiduals: Float64Array;
}

/**
 * Ritz pairs of T with θ² above `floor` from one dense eigensolve of TᵀT; eigenvalues come in equal
 * pairs (T is exactly skew), and the first vector of each pair stands for its two-dimensional space.
 * The whole spectrum is computed and the part above the floor kept: the divide-and-conquer path does
 * all 2688 pairs of the N = 100 000 check in 1.4 s, where the subset solver (dsyevr) took 3.6 s for
 * 1300 and 8.4 s for 2000 of them (measured on the 2-core CI machine).
 */
function ritzPairs(t: SkewBlockTridiagonal, lastG: Float64Array, floor: number, backend: LinearAlgebraBackend): RitzPairs {
  const m = t.dimension;
  const b = t.width;
  const gram = t.gram();
  const eig = backend.symmetricEigen(gram, { overwriteInput: true });
  let firstAbove = 0;
  if (floor > 0) while (firstAbove < eig.values.length && !(eig.values[firstAbove] > floor)) firstAbove++;
  const values = eig.values.subarray(firstAbove);
  const vec = (eig.vectors as { data: Float64Array }).data.subarray(firstAbove * m);
  const count = Math.floor(values.length / 2);
  const theta = new Float64Array(count);
  const vectors = new Float64Array(m * count);
  const relativeResiduals = new Float64Array(count);
  const lastBlock = (column: number): number => {
    // ‖G s_last‖ for eigenvector `column`
    let total = 0;
    for (let r = 0; r < b; r++) {
      let s = 0;
      for (let c = r; c < b; c++) s += lastG[r + c * b] * vec[m - b + c + column * m];
      total += s * s;
    }
    return Math.sqrt(total);
  };
  for (let p = 0; p < count; p++) {
    const first = values.length - 1 - 2 * p;
    theta[p] = Math.sqrt(Math.max(values[first], 0));
    vectors.set(vec.subarray(first * m, (first + 1) * m), p * m);
    relativeResiduals[p] = theta[p] > 0 ? Math.max(lastBlock(first), lastBlock(first - 1)) / theta[p] : Infinity;
  }
  return { theta, vectors, relativeResiduals };
}

/**
 * Pairs (σ, a, b) of Δ with σ above `cut` (or the `count` largest), by block skew Lanczos with full
 * reorthogonalisation and a residual convergence test (see the note on SkewPairs). Stops when the
 * wanted pairs and `guard` more below them are converged — a Ritz value only underestimates its
 * σ (interlacing), so converged pairs below the cut show that no wanted pair is still hiding there
 * (common practice).
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
  // small Δ: narrow blocks, since a wide block overshoots the Krylov dimension a pair needs
  const width = options.blockSize ?? Math.max(1, Math.min(DEFAULT_BLOCK, Math.floor(n / 64)));
  if (!(Number.isInteger(width) && width >= 1)) throw new Error(`blockSize must be a positive integer (got ${width})`);
  const maxDimension = Math.min(n, options.maxDimension ?? n);
  const random = seedrandom(options.seed ?? 'tacet-lanczos');
  const backend = options.backend === undefined ? getBackend() : options.backend;
  const blas = backend && backend.name === 'native' ? backend : null;
  const smallAlgebra = backend ?? getBackend('ml-matrix');
  // 4.25 dimensions per pair were needed at N = 100 000 (2688 for 632 pairs): room for that up front, since
  // growing the basis copies it and briefly holds both (the 4254 MB peak measured with 4 per pair)
  const initialColumns = options.expectedPairs !== undefined ? Math.ceil(4.6 * options.expectedPairs) + 4 * width : 16 * width;
  const precision = options.basisPrecision ?? (n >= FLOAT32_BASIS_FROM ? 'float32' : 'float64');
  const basis = new Basis(n, initialColumns, blas, precision);
  const t = new SkewBlockTridiagonal(width);
  const applyBlock = (input: Float64Array, output: Float64Array) => {
    if (op.applyBlock) op.applyBlock(input, output, width);
    else for (let lane = 0; lane < width; lane++) op.apply(input.subarray(lane * n, (lane + 1) * n), output.subarray(lane * n, (lane + 1) * n));
  };

  let block = new Float64Array(n * width);
  for (let i = 0; i < block.length; i++) block[i] = random() - 0.5;
  blockQr(basis, block, width, 1, random, blas);
  basis.push(block, width);
  let recent = Float64Array.from(block);
  let recentWidth = width;
  let products = 0;
  let steps = 0;
  let scale = 0;
  const seconds = { products: 0, orthogonalisation: 0, ritz: 0, vectors: 0 };
  // first check where about 3.5 Krylov dimensions per expected pair have been built (measured
  // 3.6–5.4 for 2D diamonds at N = 2000–20 000, blocks of 16), or early when nothing is known
  let nextCheck = options.expectedPairs !== undefined ? Math.floor(3.5 * options.expectedPairs) : 8 * width;
  let ritz: RitzPairs | null = null;
  let finished = false;
  let wanted = 0;
  let need = 0;
  const wantedOf = (r: RitzPairs) => count ?? r.theta.filter((s) => s > (cut as number)).length;
  while (!finished) {
    const w = new Float64Array(n * width);
    let clock = performance.now();
    applyBlock(block, w);
    products += width;
    steps++;
    seconds.products += (performance.now() - clock) / 1000;
    clock = performance.now();
    const coefficients = orthogonaliseBlock(basis, w, width, recent, recentWidth, blas);
    // H_i from the rows of the newest block, made exactly skew
    const m = basis.count;
    const h = new Float64Array(width * width);
    for (let c = 0; c < width; c++) for (let r = 0; r < width; r++) h[r + c * width] = coefficients[m - width + r + c * m];
    for (let c = 0; c < width; c++) {
      for (let r = 0; r <= c; r++) {
        const v = r === c ? 0 : 0.5 * (h[r + c * width] - h[c + r * width]);
        h[r + c * width] = v;
        h[c + r * width] = -v;
      }
    }
    t.diagonal.push(h);
    for (let i = 0; i < coefficients.length; i++) scale = Math.max(scale, Math.abs(coefficients[i]));
    const { g, invariant } = blockQr(basis, w, width, scale, random, blas);
    seconds.orthogonalisation += (performance.now() - clock) / 1000;
    const full = basis.count + width > maxDimension;
    if (basis.count >= nextCheck || invariant || full) {
      const floor = cut !== undefined ? 0.25 * cut * cut : 0;
      clock = performance.now();
      ritz = ritzPairs(t, invariant ? new Float64Array(width * width) : g, floor, smallAlgebra);
      seconds.ritz += (performance.now() - clock) / 1000;
      wanted = wantedOf(ritz);
      need = wanted + guard;
      let converged = 0;
      while (converged < ritz.theta.length && ritz.relativeResiduals[converged] <= tolerance) converged++;
      options.onProgress?.({ steps, products, dimension: basis.count, wanted, converged: Math.min(converged, wanted) });
      const enough = count === undefined || ritz.theta.length >= count;
      if (enough && converged >= need) finished = true;
      else if (invariant) finished = true;
      else if (full) {
        if (basis.count >= n) finished = true;
        else throw new Error(`the eigensolver did not converge within a Krylov dimension of ${basis.count} (${converged} of ${need} pairs converged)`);
      }
      // the next check where the pairs still missing should have converged, at the dimension per
      // converged pair seen so far (a little early rather than late: each check is a dense eigensolve)
      const missing = Math.max(0, need - converged);
      const perPair = basis.count / Math.max(converged, 1);
      nextCheck = basis.count + Math.max(2 * width, Math.min(Math.ceil(0.8 * missing * perPair), Math.ceil((CHECK_GROWTH - 1) * basis.count) + width * 4));
    }
    if (!finished) {
      t.subdiagonal.push(g);
      basis.push(w, width);
      // the two newest blocks side by side for the next local Gram–Schmidt
      if (recentWidth === width) {
        const both = new Float64Array(2 * n * width);
        both.set(recent, 0);
        recent = both;
        recentWidth = 2 * width;
      } else recent.copyWithin(0, n * width);
      recent.set(w, n * width);
      block = w;
    }
  }
  const final = ritz as RitzPairs;
  const keep = count ?? wantedOf(final);
  if (keep > final.theta.length) throw new Error(`only ${final.theta.length} nonzero pairs exist; asked for ${keep}`);
  const clock = performance.now();
  const basisBytes = basis.storedBytes;
  const pairs = formPairs(basis, t, final, keep);
  seconds.vectors = (performance.now() - clock) / 1000;
  return { size: n, ...pairs, steps, products, dimension: t.dimension, blockSize: width, seconds, basisPrecision: precision, basisBytes };
}

/** a = V s_1, b = V s_2 with s_2 = T s_1 / θ and θ = ‖T s_1‖ (see the note on SkewPairs). */
function formPairs(basis: Basis, t: SkewBlockTridiagonal, ritz: RitzPairs, keep: number): Pick<SkewPairs, 'sigma' | 'a' | 'b' | 'relativeResiduals'> {
  const m = t.dimension;
  const coefficients = new Float64Array(m * 2 * keep);
  const sigma = new Float64Array(keep);
  for (let p = 0; p < keep; p++) {
    const s1 = ritz.vectors.subarray(p * m, (p + 1) * m);
    const s2 = t.apply(s1);
    let length = 0;
    for (let i = 0; i < m; i++) length += s2[i] * s2[i];
    length = Math.sqrt(length);
    sigma[p] = length;
    coefficients.set(s1, 2 * p * m);
    for (let i = 0; i < m; i++) coefficients[(2 * p + 1) * m + i] = s2[i] / length;
  }
  const columns = basis.combineAndRelease(coefficients, 2 * keep);
  const a: Float64Array[] = [];
  const b: Float64Array[] = [];
  for (let p = 0; p < keep; p++) {
    a.push(columns[2 * p]);
    b.push(columns[2 * p + 1]);
  }
  return { sigma, a, b, relativeResiduals: Float64Array.from(ritz.relativeResiduals.subarray(0, keep)) };
}
