import { BitRelation, popcount } from './order';
import { longestChainsFromBelow } from './orderAlgorithms';
import { seededUniform } from './sprinkle';

/**
 * Manifold-likeness of a causal set (server/engine/README.md §16): counts of its order and the
 * dimension estimators that read a dimension off the order alone. Any dimension: coordinates with a
 * time first and any number of space coordinates, or a closed relation with no coordinates at all.
 */
export interface ManifoldLikeness {
  N: number;
  relations: number;
  links: number;
  /** elements in a longest chain */
  longestChain: number;
  /** r = R / (N choose 2) */
  orderingFraction: number;
  dimension: {
    /** the root d of r = Γ(d+1)Γ(d/2)/(2Γ(3d/2)); error: the larger of r's sampling error and the scatter over sub-intervals */
    myrheimMeyer: { estimate: number | null; error: number | null; subIntervals: number };
    /** log₂(N / N_half) with N_half the larger half cut by the midpoint element */
    midpoint: { estimate: number | null; halfSize: number };
  };
  /** N_k: related pairs with exactly k elements between them, k = 0 … maxGap (N_0 = links) */
  intervalAbundances: number[];
}

/** How the order is given: coordinates (t first, then `dimension − 1` space coordinates per element) or the closed relation. */
export type OrderInput =
  | { kind: 'points'; points: ArrayLike<number>; dimension: number; periodX?: number }
  | { kind: 'relation'; causal: BitRelation };

export interface ManifoldLikenessOptions {
  /** largest k of the interval abundances N_k (default 10) */
  maxGap?: number;
  /** sub-intervals sampled for the Myrheim–Meyer error (default 24) */
  subIntervals?: number;
  /** seed of the sub-interval sample, so a report is the same each time (default "inspect") */
  seed?: string;
}

/** Above this N a relation is not built element by element (N²/8 bytes and N² pair tests). */
export const RELATION_INSPECT_LIMIT = 20_000;

/**
 * ln Γ(x) for x > 0 by the Lanczos approximation with g = 7 and nine coefficients (Numerical Recipes
 * 3rd ed. §6.1; the coefficients are the widely published set, recalled from memory and checked in
 * tests against Γ(n) = (n−1)! and Γ(½) = √π), relative error about 1e-15; x < ½ by reflection.
 */
export function lnGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - lnGamma(1 - x);
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
    -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  const z = x - 1;
  let sum = c[0];
  for (let k = 1; k < 9; k++) sum += c[k] / (z + k);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(sum);
}

/**
 * The expected ordering fraction of a sprinkled causal diamond in d-dimensional Minkowski space,
 * Γ(d+1)Γ(d/2)/(2Γ(3d/2)) (Myrheim 1978; Meyer 1988): ½ in 2D, 8/35 in 3D, 1/10 in 4D.
 */
export function diamondOrderingFraction(d: number): number {
  return Math.exp(lnGamma(d + 1) + lnGamma(d / 2) - lnGamma((3 * d) / 2)) / 2;
}

/**
 * The Myrheim–Meyer dimension: the d ≥ 1 with diamondOrderingFraction(d) = r, by bisection (the
 * fraction falls from 1 at d = 1 towards 0); null for r outside (0, 1] or beyond d = 40.
 */
export function myrheimMeyerDimension(r: number): number | null {
  if (!(r > 0 && r <= 1)) return null;
  let lo = 1;
  let hi = 40;
  if (diamondOrderingFraction(hi) > r) return null;
  for (let k = 0; k < 100; k++) {
    const mid = 0.5 * (lo + hi);
    if (diamondOrderingFraction(mid) > r) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The midpoint-scaling dimension (server/engine/README.md §16): in an interval of N elements the
 * element z that cuts it most evenly leaves about N/2^d elements in each half, so d = log₂(N/N_half)
 * with N_half the larger half at that z. The whole set stands for the interval.
 */
function midpointDimension(pastSize: Int32Array, futureSize: Int32Array): { estimate: number | null; halfSize: number } {
  const n = pastSize.length;
  let best = -1;
  let half = 0;
  for (let z = 0; z < n; z++) {
    const smaller = Math.min(pastSize[z], futureSize[z]);
    if (smaller > best) {
      best = smaller;
      half = Math.max(pastSize[z], futureSize[z]);
    }
  }
  return { estimate: half > 0 ? Math.log2(n / half) : null, halfSize: half };
}

/**
 * The Myrheim–Meyer estimate of the whole set with its error, the larger of two:
 * - the sampling error of r as a U-statistic of order 2 (Hoeffding 1948): Var r ≈ 4ζ₁/N + 2r(1−r)/N²,
 *   ζ₁ the variance over elements of the share of the others each is related to, carried to d through
 *   the slope of the diamond ordering fraction (calibrated against the seed-to-seed spread of sprinkled
 *   2D and 4D diamonds in tests/engine/manifoldLikeness.test.ts);
 * - the scatter of the estimates of sampled sub-intervals (at least N/8 elements): every interval of a
 *   manifold-like set is a diamond of the same spacetime, so their estimates scatter about the same d;
 *   an ordering fraction's variance falls as 1/n, so the scatter is scaled by √(n̄/N). This one also
 *   grows when the set is not homogeneous, which the first does not see.
 */
function myrheimMeyerWithError(
  n: number,
  relations: number,
  subIntervals: { size: number; relations: number }[],
  pastSize: Int32Array,
  futureSize: Int32Array,
): ManifoldLikeness['dimension']['myrheimMeyer'] {
  const pairs = (m: number) => (m * (m - 1)) / 2;
  const r = n > 1 ? relations / pairs(n) : 0;
  const estimate = n > 1 ? myrheimMeyerDimension(r) : null;
  const estimates = subIntervals.map((s) => myrheimMeyerDimension(s.relations / pairs(s.size))).filter((d): d is number => d !== null);
  if (estimate === null || n < 3) return { estimate, error: null, subIntervals: estimates.length };
  let meanShare = 0;
  for (let i = 0; i < n; i++) meanShare += (pastSize[i] + futureSize[i]) / (n - 1);
  meanShare /= n;
  let zeta = 0;
  for (let i = 0; i < n; i++) zeta += ((pastSize[i] + futureSize[i]) / (n - 1) - meanShare) ** 2;
  zeta /= n - 1;
  const step = 1e-4 * estimate;
  const slope = Math.abs(diamondOrderingFraction(estimate + step) - diamondOrderingFraction(estimate - step)) / (2 * step);
  const sampling = Math.sqrt((4 * zeta) / n + (2 * r * (1 - r)) / (n * n)) / slope;
  let scatter = 0;
  if (estimates.length >= 4) {
    const mean = estimates.reduce((s, d) => s + d, 0) / estimates.length;
    const sd = Math.sqrt(estimates.reduce((s, d) => s + (d - mean) ** 2, 0) / (estimates.length - 1));
    const meanSize = subIntervals.reduce((s, x) => s + x.size, 0) / subIntervals.length;
    scatter = sd * Math.sqrt(meanSize / n);
  }
  return { estimate, error: Math.max(sampling, scatter), subIntervals: estimates.length };
}

/** The closed relation of points with t first and any number of space coordinates (periodic x in 2D when given). */
export function relationOfPoints(points: ArrayLike<number>, dimension: number, periodX?: number): BitRelation {
  const n = points.length / dimension;
  if (!Number.isInteger(n)) throw new RangeError(`point array length ${points.length} is not a multiple of ${dimension}`);
  const relation = new BitRelation(n);
  for (let i = 0; i < n; i++) {
    const a = i * dimension;
    for (let j = 0; j < n; j++) {
      const b = j * dimension;
      const dt = points[b] - points[a];
      if (!(dt > 0)) continue;
      let space = 0;
      for (let k = 1; k < dimension; k++) {
        let d = points[b + k] - points[a + k];
        if (k === 1 && periodX !== undefined) {
          d = Math.abs(d) % periodX;
          d = Math.min(d, periodX - d);
        }
        space += d * d;
      }
      if (dt * dt > space) relation.set(i, j);
    }
  }
  return relation;
}

/** Manifold-likeness from the closed relation: O(R · N/32) for the interval sizes of all related pairs. */
function fromRelation(causal: BitRelation, maxGap: number, samples: number, seed: string): ManifoldLikeness {
  const n = causal.size;
  const past = causal.transpose();
  const w = causal.wordsPerRow;
  const fw = causal.words;
  const pw = past.words;
  const pastSize = new Int32Array(n);
  const futureSize = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let f = 0;
    let p = 0;
    for (let k = 0; k < w; k++) {
      f += popcount(fw[i * w + k]);
      p += popcount(pw[i * w + k]);
    }
    futureSize[i] = f;
    pastSize[i] = p;
  }
  const abundances = new Array<number>(maxGap + 1).fill(0);
  let relations = 0;
  causal.forEach((i, j) => {
    relations += 1;
    let between = 0;
    for (let k = 0; k < w && between <= maxGap; k++) between += popcount(fw[i * w + k] & pw[j * w + k]);
    if (between <= maxGap) abundances[between] += 1;
  });
  // longest chain: visiting elements by the size of their past is a linear extension
  const order = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => pastSize[a] - pastSize[b] || a - b);
  const longestChain = longestChainsFromBelow(past, order).height;
  // sub-intervals for the error: random related pairs whose interval holds at least N/8 elements
  const uniform = seededUniform(seed);
  const minimum = Math.max(8, Math.ceil(n / 8));
  const candidates = order.filter((i) => futureSize[i] >= minimum);
  const subIntervals: { size: number; relations: number }[] = [];
  const mask = new Uint32Array(w);
  for (let attempt = 0; attempt < 40 * samples && subIntervals.length < samples && candidates.length > 0; attempt++) {
    const p = candidates[Math.floor(uniform() * candidates.length)];
    const q = randomMember(fw, p * w, w, futureSize[p], uniform());
    let size = 0;
    for (let k = 0; k < w; k++) {
      mask[k] = fw[p * w + k] & pw[q * w + k];
      size += popcount(mask[k]);
    }
    if (size < minimum) continue;
    let inside = 0;
    for (let k = 0; k < w; k++) {
      let bits = mask[k];
      while (bits !== 0) {
        const low = bits & -bits;
        const e = (k << 5) + (31 - Math.clz32(low));
        for (let m = 0; m < w; m++) inside += popcount(fw[e * w + m] & mask[m]);
        bits ^= low;
      }
    }
    subIntervals.push({ size, relations: inside });
  }
  return {
    N: n,
    relations,
    links: abundances[0],
    longestChain,
    orderingFraction: n > 1 ? relations / ((n * (n - 1)) / 2) : 0,
    dimension: { myrheimMeyer: myrheimMeyerWithError(n, relations, subIntervals, pastSize, futureSize), midpoint: midpointDimension(pastSize, futureSize) },
    intervalAbundances: abundances,
  };
}

/** The element of a bit-packed row (from `offset`, `w` words, `count` bits set) at a uniform position. */
function randomMember(words: Uint32Array, offset: number, w: number, count: number, unit: number): number {
  let wanted = Math.min(count - 1, Math.floor(unit * count));
  for (let k = 0; k < w; k++) {
    let bits = words[offset + k];
    const here = popcount(bits);
    if (wanted >= here) {
      wanted -= here;
      continue;
    }
    while (wanted > 0) {
      bits &= bits - 1;
      wanted--;
    }
    return (k << 5) + (31 - Math.clz32(bits & -bits));
  }
  throw new RangeError('row holds fewer bits than counted');
}

/** A Fenwick tree of counts over ranks 0 … size−1. */
class RankCounter {
  private readonly tree: Int32Array;
  constructor(size: number) {
    this.tree = new Int32Array(size + 1);
  }
  add(rank: number): void {
    for (let i = rank + 1; i < this.tree.length; i += i & -i) this.tree[i] += 1;
  }
  /** how many added ranks are below `rank` */
  below(rank: number): number {
    let total = 0;
    for (let i = rank; i > 0; i -= i & -i) total += this.tree[i];
    return total;
  }
}

/** Dense ranks of values (equal values share a rank). */
function ranks(values: Float64Array): { rank: Int32Array; count: number } {
  const order = Int32Array.from({ length: values.length }, (_, i) => i).sort((a, b) => values[a] - values[b]);
  const rank = new Int32Array(values.length);
  let current = -1;
  let previous = Number.NaN;
  for (const i of order) {
    if (values[i] !== previous) {
      current += 1;
      previous = values[i];
    }
    rank[i] = current;
  }
  return { rank, count: current + 1 };
}

/**
 * Manifold-likeness of 2D points in light-cone coordinates u = t + x, v = t − x, where i ≺ j iff
 * u_i < u_j and v_i < v_j: relations, past and future sizes by a Fenwick sweep, the longest chain as
 * the longest increasing run of v in u order, and the interval abundances on a grid of cells, which
 * holds the search for the pairs with at most maxGap elements between them to a band of cells.
 * O(N log N) plus about N^(3/2) for the abundances; no N × N relation.
 */
function from2dPoints(points: ArrayLike<number>, maxGap: number, samples: number, seed: string): ManifoldLikeness {
  const n = points.length / 2;
  const u = new Float64Array(n);
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    u[i] = points[2 * i] + points[2 * i + 1];
    v[i] = points[2 * i] - points[2 * i + 1];
  }
  const byU = Int32Array.from({ length: n }, (_, i) => i).sort((a, b) => u[a] - u[b] || v[a] - v[b]);
  const { rank: vRank, count: vRanks } = ranks(v);
  const pastSize = new Int32Array(n);
  const futureSize = new Int32Array(n);
  // sweeps over groups of equal u (elements with equal u are unrelated)
  const groups: [number, number][] = [];
  for (let s = 0; s < n; ) {
    let e = s + 1;
    while (e < n && u[byU[e]] === u[byU[s]]) e++;
    groups.push([s, e]);
    s = e;
  }
  let counter = new RankCounter(vRanks);
  let relations = 0;
  let seen = 0;
  for (const [s, e] of groups) {
    for (let k = s; k < e; k++) pastSize[byU[k]] = counter.below(vRank[byU[k]]);
    for (let k = s; k < e; k++) counter.add(vRank[byU[k]]);
    seen += e - s;
  }
  counter = new RankCounter(vRanks);
  seen = 0;
  for (let g = groups.length - 1; g >= 0; g--) {
    const [s, e] = groups[g];
    for (let k = s; k < e; k++) futureSize[byU[k]] = seen - counter.below(vRank[byU[k]] + 1);
    for (let k = s; k < e; k++) counter.add(vRank[byU[k]]);
    seen += e - s;
  }
  for (let i = 0; i < n; i++) relations += pastSize[i];

  // longest chain: strictly increasing v along strictly increasing u (patience sorting by groups)
  const tails: number[] = [];
  for (const [s, e] of groups) {
    const updates: [number, number][] = [];
    for (let k = s; k < e; k++) {
      const value = v[byU[k]];
      let lo = 0;
      let hi = tails.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (tails[mid] < value) lo = mid + 1;
        else hi = mid;
      }
      updates.push([lo, value]);
    }
    for (const [position, value] of updates) {
      if (position === tails.length) tails.push(value);
      else if (value < tails[position]) tails[position] = value;
    }
  }

  const grid = cellGrid(u, v, byU);
  const abundances = gapAbundances(u, v, grid, maxGap);
  const subIntervals = sampledSubIntervals2d(u, v, grid, samples, seed);
  return {
    N: n,
    relations,
    links: abundances[0],
    longestChain: tails.length,
    orderingFraction: n > 1 ? relations / ((n * (n - 1)) / 2) : 0,
    dimension: { myrheimMeyer: myrheimMeyerWithError(n, relations, subIntervals, pastSize, futureSize), midpoint: midpointDimension(pastSize, futureSize) },
    intervalAbundances: abundances,
  };
}

/** Elements binned in a columns × rows grid over (u, v), each cell's elements in u order (CSR arrays). */
interface CellGrid {
  columns: number;
  rows: number;
  uMin: number;
  vMin: number;
  uStep: number;
  vStep: number;
  start: Int32Array;
  elements: Int32Array;
}

function cellGrid(u: Float64Array, v: Float64Array, byU: Int32Array): CellGrid {
  const n = u.length;
  // cells of about two elements: the scans of the column and of the row of each element then meet the
  // fewest elements outside the future of interest (measured at N = 100 000)
  const side = Math.max(1, Math.ceil(Math.sqrt(n / 2)));
  let uMin = Infinity;
  let uMax = -Infinity;
  let vMin = Infinity;
  let vMax = -Infinity;
  for (let i = 0; i < n; i++) {
    uMin = Math.min(uMin, u[i]);
    uMax = Math.max(uMax, u[i]);
    vMin = Math.min(vMin, v[i]);
    vMax = Math.max(vMax, v[i]);
  }
  const uStep = (uMax - uMin) / side || 1;
  const vStep = (vMax - vMin) / side || 1;
  const cellOf = (i: number) => Math.min(side - 1, Math.floor((u[i] - uMin) / uStep)) * side + Math.min(side - 1, Math.floor((v[i] - vMin) / vStep));
  const start = new Int32Array(side * side + 1);
  for (let i = 0; i < n; i++) start[cellOf(i) + 1] += 1;
  for (let c = 0; c < side * side; c++) start[c + 1] += start[c];
  const fill = start.slice(0, side * side);
  const elements = new Int32Array(n);
  for (const i of byU) elements[fill[cellOf(i)]++] = i;
  return { columns: side, rows: side, uMin, vMin, uStep, vStep, start, elements };
}

/**
 * N_k for k ≤ maxGap. For each i the elements of its future are met in u order, keeping the maxGap + 1
 * smallest v seen so far in the future of i: an element j has k elements between i and j when k of
 * the seen v lie below v_j, so once maxGap + 1 are seen, only elements below the largest of them can
 * still count, and the cells above it are skipped.
 */
function gapAbundances(u: Float64Array, v: Float64Array, grid: CellGrid, maxGap: number): number[] {
  const n = u.length;
  const abundances = new Array<number>(maxGap + 1).fill(0);
  const keep = maxGap + 1;
  const smallest = new Float64Array(keep);
  // u and v copied into the grid's order: the scans below then read memory in sequence
  const cu = new Float64Array(n);
  const cv = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    cu[k] = u[grid.elements[k]];
    cv[k] = v[grid.elements[k]];
  }
  /** positions (in grid order) of the candidates of one column, in u order */
  const candidates = new Int32Array(n);
  const columnOf = (x: number) => Math.min(grid.columns - 1, Math.max(0, Math.floor((x - grid.uMin) / grid.uStep)));
  const rowOf = (y: number) => Math.min(grid.rows - 1, Math.max(0, Math.floor((y - grid.vMin) / grid.vStep)));
  for (let i = 0; i < n; i++) {
    let held = 0;
    const ui = u[i];
    const vi = v[i];
    const firstRow = rowOf(vi);
    for (let column = columnOf(ui); column < grid.columns; column++) {
      const lastRow = held === keep ? rowOf(smallest[keep - 1]) : grid.rows - 1;
      let count = 0;
      let cellsWithCandidates = 0;
      for (let row = firstRow; row <= lastRow; row++) {
        const cell = column * grid.rows + row;
        const before = count;
        for (let k = grid.start[cell]; k < grid.start[cell + 1]; k++) {
          if (cu[k] > ui && cv[k] > vi) candidates[count++] = k;
        }
        if (count > before) cellsWithCandidates++;
      }
      // each cell is in u order; several cells of the column are merged by one sort (merging them by
      // insertion cost the square of the column's candidates, hundreds in the column of i itself)
      if (cellsWithCandidates > 1) sortByKey(candidates, count, cu);
      for (let s = 0; s < count; ) {
        let e = s + 1;
        while (e < count && cu[candidates[e]] === cu[candidates[s]]) e++;
        // a group of equal u: none lies between i and another of the group, so count before inserting
        for (let k = s; k < e; k++) {
          const vj = cv[candidates[k]];
          if (held === keep && vj >= smallest[keep - 1]) continue;
          let below = 0;
          while (below < held && smallest[below] < vj) below++;
          if (below <= maxGap) abundances[below] += 1;
        }
        for (let k = s; k < e; k++) {
          const vj = cv[candidates[k]];
          if (held === keep && vj >= smallest[keep - 1]) continue;
          let at = held === keep ? keep - 1 : held++;
          while (at > 0 && smallest[at - 1] > vj) {
            smallest[at] = smallest[at - 1];
            at--;
          }
          smallest[at] = vj;
        }
        s = e;
      }
    }
  }
  return abundances;
}

/** Sorts the first `count` entries of `positions` by key[position] (stable order is not needed). */
function sortByKey(positions: Int32Array, count: number, key: Float64Array): void {
  positions.subarray(0, count).sort((a, b) => key[a] - key[b]);
}

/** Random intervals of at least N/8 elements and the relations inside each (a Fenwick sweep per interval). */
function sampledSubIntervals2d(u: Float64Array, v: Float64Array, grid: CellGrid, samples: number, seed: string): { size: number; relations: number }[] {
  const n = u.length;
  const minimum = Math.max(8, Math.ceil(n / 8));
  const uniform = seededUniform(seed);
  const spanU = grid.uStep * grid.columns;
  const spanV = grid.vStep * grid.rows;
  const result: { size: number; relations: number }[] = [];
  for (let attempt = 0; attempt < 200 * samples && result.length < samples; attempt++) {
    const p = Math.floor(uniform() * n);
    const q = Math.floor(uniform() * n);
    const du = u[q] - u[p];
    const dv = v[q] - v[p];
    // an interval of an eighth of the elements spans at least about an eighth of the (u, v) box
    if (!(du > 0 && dv > 0) || du * dv < (spanU * spanV) / 16) continue;
    const inside: number[] = [];
    const c0 = Math.floor((u[p] - grid.uMin) / grid.uStep);
    const c1 = Math.min(grid.columns - 1, Math.floor((u[q] - grid.uMin) / grid.uStep));
    const r0 = Math.floor((v[p] - grid.vMin) / grid.vStep);
    const r1 = Math.min(grid.rows - 1, Math.floor((v[q] - grid.vMin) / grid.vStep));
    for (let c = c0; c <= c1; c++) {
      for (let r = r0; r <= r1; r++) {
        const cell = c * grid.rows + r;
        for (let k = grid.start[cell]; k < grid.start[cell + 1]; k++) {
          const e = grid.elements[k];
          if (u[e] > u[p] && u[e] < u[q] && v[e] > v[p] && v[e] < v[q]) inside.push(e);
        }
      }
    }
    if (inside.length < minimum) continue;
    inside.sort((a, b) => u[a] - u[b] || v[a] - v[b]);
    const { rank, count } = ranks(Float64Array.from(inside, (e) => v[e]));
    const counter = new RankCounter(count);
    let relations = 0;
    for (let s = 0; s < inside.length; ) {
      let e = s + 1;
      while (e < inside.length && u[inside[e]] === u[inside[s]]) e++;
      for (let k = s; k < e; k++) relations += counter.below(rank[k]);
      for (let k = s; k < e; k++) counter.add(rank[k]);
      s = e;
    }
    result.push({ size: inside.length, relations });
  }
  return result;
}

/**
 * Counts and dimension estimators of a causal set (server/engine/README.md §16). Non-periodic 2D points
 * take the light-cone route (no N × N relation, 100 000 elements in seconds); other points build the
 * relation (N ≤ RELATION_INSPECT_LIMIT); a relation is used as given.
 */
export function manifoldLikeness(input: OrderInput, options: ManifoldLikenessOptions = {}): ManifoldLikeness {
  const maxGap = options.maxGap ?? 10;
  const samples = options.subIntervals ?? 24;
  const seed = options.seed ?? 'inspect';
  if (!(Number.isInteger(maxGap) && maxGap >= 0 && maxGap <= 1000)) throw new RangeError('maxGap must be a whole number from 0 to 1000');
  if (input.kind === 'relation') return fromRelation(input.causal, maxGap, samples, seed);
  const { points, dimension, periodX } = input;
  if (!(Number.isInteger(dimension) && dimension >= 2)) throw new RangeError('points need a time and at least one space coordinate');
  if (dimension === 2 && periodX === undefined) return from2dPoints(points, maxGap, samples, seed);
  const n = points.length / dimension;
  if (n > RELATION_INSPECT_LIMIT) {
    throw new RangeError(`${n} elements in ${dimension}D${periodX !== undefined ? ' with a periodic x' : ''}: the relation is built pair by pair up to ${RELATION_INSPECT_LIMIT} elements (2D points without a periodic x have no limit)`);
  }
  return fromRelation(relationOfPoints(points, dimension, periodX), maxGap, samples, seed);
}

/**
 * The manifold-likeness of a computed vacuum's causal set: its points (with the region's periodic x),
 * or the relation it was given; null where the relation route would exceed RELATION_INSPECT_LIMIT.
 */
export function manifoldOfVacuum(
  source: { kind: string; causal?: Uint32Array; count?: number },
  result: { points: Float64Array; dimension: 2 | 4; N: number; periodX?: number },
): ManifoldLikeness | null {
  if (source.kind === 'order' && source.causal && source.count !== undefined) {
    return manifoldLikeness({ kind: 'relation', causal: BitRelation.fromWords(source.causal, source.count) });
  }
  if (result.points.length === 0) return null;
  if (!(result.dimension === 2 && result.periodX === undefined) && result.N > RELATION_INSPECT_LIMIT) return null;
  return manifoldLikeness({ kind: 'points', points: result.points, dimension: result.dimension, periodX: result.periodX });
}
