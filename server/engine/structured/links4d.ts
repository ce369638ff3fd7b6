/**
 * The 4D Pauli–Jordan operator as a sparse product over the links (issue 9).
 *
 * In 4D the massless retarded Green function is K = (√ρ / (2π√6)) Lᵀ (Johnston 2009, PRL 103 180401;
 * server/engine/README.md §4): only links enter, and a sprinkled 4D causal set has far fewer links than relations.
 * The links are found from bit-packed causal rows in time order and kept as compressed sparse rows
 * (CSR) twice — each element's past links and its future links — so K·w and Kᵀ·w cost O(links).
 */
import type { SkewOperator } from './dominance2d';
import { fourDimensionalLinkWeight } from '../green';

/** A 0/1 matrix in compressed sparse rows: row r holds the columns index[start[r]] … index[start[r+1]−1]. */
export interface SparseRows {
  size: number;
  start: Int32Array;
  index: Int32Array;
}

/** The links of a 4D point set in time order, both ways round. */
export interface Links4D {
  size: number;
  /** element labels by increasing t (ties by label): a linear extension of ≺ */
  byTime: Int32Array;
  /** row q (time position) lists the time positions p < q with p ⋖ q (p a link to the past of q) */
  past: SparseRows;
  /** row p lists the time positions q > p with p ⋖ q */
  future: SparseRows;
  /** number of links */
  count: number;
}

function precedes4(points: ArrayLike<number>, a: number, b: number): boolean {
  const i = 4 * a;
  const j = 4 * b;
  const dt = points[j] - points[i];
  if (dt <= 0) return false;
  const dx = points[j + 1] - points[i + 1];
  const dy = points[j + 2] - points[i + 2];
  const dz = points[j + 3] - points[i + 3];
  return dt * dt > dx * dx + dy * dy + dz * dz;
}

/**
 * The links of 4D points (t, x, y, z per element; server/engine/README.md §1: i ⋖ j iff i ≺ j with nothing
 * between). Sorted by t, the past of element q is a bit row over the positions before q (N²/16 bytes in
 * all). For each q its past is scanned latest first: p is a link iff no later predecessor k of q has
 * p ≺ k. Every non-link p lies in the past of some link k of q (take a maximal element between), so it
 * suffices to OR in the past rows of the links found so far. Cost O(N² + links · N/32) word operations.
 */
export function links4D(points: ArrayLike<number>, onProgress?: (fraction: number) => void): Links4D {
  if (points.length % 4 !== 0) throw new Error(`4D points need t, x, y, z per element (got ${points.length} numbers)`);
  const size = points.length / 4;
  for (let k = 0; k < points.length; k++) if (!Number.isFinite(points[k])) throw new Error(`element ${Math.floor(k / 4)} has a non-finite coordinate`);
  const byTime = Int32Array.from({ length: size }, (_, i) => i).sort((a, b) => points[4 * a] - points[4 * b] || a - b);
  const sorted = new Float64Array(4 * size);
  for (let p = 0; p < size; p++) sorted.set([points[4 * byTime[p]], points[4 * byTime[p] + 1], points[4 * byTime[p] + 2], points[4 * byTime[p] + 3]], 4 * p);
  // row q holds bits 0 … q−1, in ⌈q/32⌉ words starting at rowStart[q]: a triangle, half the square
  const rowStart = new Float64Array(size + 1);
  for (let q = 0; q < size; q++) rowStart[q + 1] = rowStart[q] + ((q + 31) >>> 5);
  const pastBits = new Uint32Array(rowStart[size]);
  const covered = new Uint32Array((size + 31) >>> 5);
  const pastCounts = new Int32Array(size);
  const pastLinks: number[] = [];
  const reportEvery = Math.max(1, Math.floor(size / 50));
  for (let q = 0; q < size; q++) {
    const base = rowStart[q];
    for (let p = 0; p < q; p++) if (precedes4(sorted, p, q)) pastBits[base + (p >>> 5)] |= 1 << (p & 31);
    const words = (q + 31) >>> 5;
    covered.fill(0, 0, words);
    let found = 0;
    for (let k = words - 1; k >= 0; k--) {
      let bits = pastBits[base + k] & ~covered[k];
      while (bits !== 0) {
        const high = 31 - Math.clz32(bits);
        const p = (k << 5) + high;
        bits &= ~(1 << high);
        // p is a link of q; everything in its past is not
        pastLinks.push(p);
        found++;
        const pBase = rowStart[p];
        const pWords = (p + 31) >>> 5;
        for (let w = 0; w < pWords; w++) covered[w] |= pastBits[pBase + w];
        bits &= ~covered[k];
      }
    }
    pastCounts[q] = found;
    if (onProgress && q % reportEvery === 0) onProgress(q / size);
  }
  const past = toRows(size, pastCounts, pastLinks);
  return { size, byTime, past, future: transposeRows(past), count: pastLinks.length };
}

function toRows(size: number, counts: Int32Array, flat: number[]): SparseRows {
  const start = new Int32Array(size + 1);
  for (let r = 0; r < size; r++) start[r + 1] = start[r] + counts[r];
  return { size, start, index: Int32Array.from(flat) };
}

function transposeRows(rows: SparseRows): SparseRows {
  const { size, start, index } = rows;
  const counts = new Int32Array(size + 1);
  for (let k = 0; k < index.length; k++) counts[index[k] + 1]++;
  for (let r = 0; r < size; r++) counts[r + 1] += counts[r];
  const out = new Int32Array(index.length);
  const fill = counts.slice(0, size);
  for (let r = 0; r < size; r++) for (let k = start[r]; k < start[r + 1]; k++) out[fill[index[k]]++] = r;
  return { size, start: counts, index: out };
}

export interface PauliJordan4DOptions {
  /** sprinkling density ρ (the link weight √ρ/(2π√6) needs it) */
  density: number;
  /** field mass m ≥ 0 (default 0) */
  mass?: number;
}

/**
 * Δ = K − Kᵀ for the 4D retarded Green function: massless K = (√ρ/(2π√6)) Lᵀ (Johnston 2009, PRL 103
 * 180401), massive K_m = Φ(I + (m²/ρ)Φ)⁻¹ with Φ the massless K (Johnston 2008/2009; server/engine/README.md §4).
 * K_m·w = Φs with (I + cΦ)s = w, c = m²/ρ: Φ is strictly lower triangular in time order, so s is
 * found by forward substitution over the past links and Φs in the same pass (row q needs only s at
 * its past links, all earlier). K_mᵀ·w = Φᵀs' with (I + cΦᵀ)s' = w likewise, backwards over the future
 * links. Two sparse passes per product, no inverse and no N×N matrix.
 */
export class PauliJordan4D implements SkewOperator {
  readonly size: number;
  readonly weight: number;
  readonly substitution: number;

  constructor(
    readonly links: Links4D,
    options: PauliJordan4DOptions,
  ) {
    const mass = options.mass ?? 0;
    if (!(options.density > 0 && Number.isFinite(options.density))) throw new Error('the 4D Green function needs the sprinkling density (a positive number)');
    if (!(mass >= 0) || !Number.isFinite(mass)) throw new Error(`mass must be a finite number ≥ 0 (got ${mass})`);
    this.size = links.size;
    this.weight = fourDimensionalLinkWeight(options.density);
    this.substitution = (mass * mass) / options.density;
  }

  /**
   * One pass in time order (retarded) or against it (advanced) for `width` interleaved lanes:
   * w[p·width + lane] at time position p; out[p·width + lane] = (K w)_p or (Kᵀ w)_p.
   */
  private pass(w: Float64Array, out: Float64Array, width: number, advanced: boolean): void {
    const { start, index } = advanced ? this.links.future : this.links.past;
    const n = this.size;
    const weight = this.weight;
    const c = this.substitution;
    const s = c > 0 ? new Float64Array(n * width) : w;
    const acc = new Float64Array(width);
    for (let step = 0; step < n; step++) {
      const q = advanced ? n - 1 - step : step;
      acc.fill(0);
      for (let k = start[q]; k < start[q + 1]; k++) {
        const base = index[k] * width;
        for (let lane = 0; lane < width; lane++) acc[lane] += s[base + lane];
      }
      const qBase = q * width;
      for (let lane = 0; lane < width; lane++) {
        const phi = weight * acc[lane];
        out[qBase + lane] = phi;
        if (c > 0) s[qBase + lane] = w[qBase + lane] - c * phi;
      }
    }
  }

  /** output = K·input (the retarded Green function applied to a vector, element order) */
  applyRetarded(input: Float64Array, output: Float64Array): void {
    const { byTime } = this.links;
    const sorted = Float64Array.from(byTime, (e) => input[e]);
    const out = new Float64Array(this.size);
    this.pass(sorted, out, 1, false);
    for (let p = 0; p < this.size; p++) output[byTime[p]] = out[p];
  }

  /** output = Kᵀ·input (the advanced Green function, element order) */
  applyAdvanced(input: Float64Array, output: Float64Array): void {
    const { byTime } = this.links;
    const sorted = Float64Array.from(byTime, (e) => input[e]);
    const out = new Float64Array(this.size);
    this.pass(sorted, out, 1, true);
    for (let p = 0; p < this.size; p++) output[byTime[p]] = out[p];
  }

  applyBlock(input: Float64Array, output: Float64Array, width: number): void {
    const n = this.size;
    if (!(Number.isInteger(width) && width >= 1) || input.length !== n * width || output.length !== n * width) {
      throw new Error(`a block of ${width} vectors needs ${n * width} entries`);
    }
    const { byTime } = this.links;
    const sorted = new Float64Array(n * width);
    for (let lane = 0; lane < width; lane++) {
      const offset = lane * n;
      for (let p = 0; p < n; p++) sorted[p * width + lane] = input[offset + byTime[p]];
    }
    const retarded = new Float64Array(n * width);
    const advanced = new Float64Array(n * width);
    this.pass(sorted, retarded, width, false);
    this.pass(sorted, advanced, width, true);
    for (let lane = 0; lane < width; lane++) {
      const offset = lane * n;
      for (let p = 0; p < n; p++) output[offset + byTime[p]] = retarded[p * width + lane] - advanced[p * width + lane];
    }
  }

  apply(input: Float64Array, output: Float64Array): void {
    if (input.length !== this.size || output.length !== this.size) throw new Error(`vector length must be ${this.size}`);
    this.applyBlock(input, output, 1);
  }
}

/** The operator for flat 4D points (t, x, y, z per element). */
export function pauliJordan4DFromPoints(points: ArrayLike<number>, options: PauliJordan4DOptions): PauliJordan4D {
  return new PauliJordan4D(links4D(points), options);
}
