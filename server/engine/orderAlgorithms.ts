import { BitRelation, linkMatrix } from './order';

/**
 * Algorithms on a causal order given by its relation alone (no coordinates): closing a list of pairs,
 * finding a cycle in it, a labelling that respects the order, and the order's summary statistics.
 * Used by the upload parser, the dense pipeline and the study cell alike.
 */

/** The pairs listed contain a cycle, so they are not a causal order; `pairs` are its pair indices in chain order. */
export class RelationCycleError extends Error {
  override readonly name = 'RelationCycleError';
  constructor(
    /** indices into the pair lists, each pair's `to` the next one's `from`, the last closing on the first */
    readonly pairs: Int32Array,
    /** the elements along the cycle, the first repeated at the end */
    readonly elements: Int32Array,
  ) {
    super(`pairs ${Array.from(pairs).join(', ')} form a cycle ${Array.from(elements).join(' ≺ ')}; a causal order has no cycles`);
  }
}

function checkPairs(count: number, from: Int32Array, to: Int32Array): void {
  if (!(Number.isInteger(count) && count >= 0)) throw new RangeError(`the element count must be a whole number ≥ 0, got ${count}`);
  if (from.length !== to.length) throw new RangeError(`${from.length} pair starts but ${to.length} pair ends`);
  for (let p = 0; p < from.length; p++) {
    if (!(from[p] >= 0 && from[p] < count && to[p] >= 0 && to[p] < count)) {
      throw new RangeError(`pair ${p} (${from[p]} ≺ ${to[p]}) names an element outside 0..${count - 1}`);
    }
  }
}

interface KahnPass {
  /** pairs leaving element u: outPair[outStart[u] .. outStart[u + 1]) */
  outStart: Int32Array;
  outPair: Int32Array;
  /** the elements in topological order; only the first `placed` are valid */
  topo: Int32Array;
  placed: number;
  /** in-degrees left after the pass: positive exactly on the elements a cycle keeps from being placed */
  indegree: Int32Array;
}

/** Topological order of the pairs by repeatedly taking an element with no predecessor left (Kahn 1962). */
function kahnPass(count: number, from: Int32Array, to: Int32Array): KahnPass {
  const pairs = from.length;
  const outStart = new Int32Array(count + 1);
  for (let p = 0; p < pairs; p++) outStart[from[p] + 1] += 1;
  for (let i = 0; i < count; i++) outStart[i + 1] += outStart[i];
  const outPair = new Int32Array(pairs);
  const fill = outStart.slice(0, count);
  for (let p = 0; p < pairs; p++) outPair[fill[from[p]]++] = p;

  const indegree = new Int32Array(count);
  for (let p = 0; p < pairs; p++) indegree[to[p]] += 1;
  const topo = new Int32Array(count);
  let head = 0;
  let tail = 0;
  for (let i = 0; i < count; i++) if (indegree[i] === 0) topo[tail++] = i;
  while (head < tail) {
    const u = topo[head++];
    for (let k = outStart[u]; k < outStart[u + 1]; k++) {
      const v = to[outPair[k]];
      if (--indegree[v] === 0) topo[tail++] = v;
    }
  }
  return { outStart, outPair, topo, placed: tail, indegree };
}

/**
 * Every element left with a positive in-degree after Kahn's pass has a predecessor that is also left,
 * so walking backwards from one of them must come round to an element already visited: that is a cycle.
 */
function cycleInRemainder(count: number, from: Int32Array, to: Int32Array, indegree: Int32Array): RelationCycleError {
  const remainingPredecessorPair = new Int32Array(count).fill(-1);
  for (let p = 0; p < from.length; p++) {
    if (indegree[from[p]] > 0 && indegree[to[p]] > 0) remainingPredecessorPair[to[p]] = p;
  }
  let start = 0;
  while (indegree[start] === 0) start++;
  const visitedAt = new Map<number, number>();
  const walk: number[] = [];
  let node = start;
  while (!visitedAt.has(node)) {
    visitedAt.set(node, walk.length);
    const p = remainingPredecessorPair[node];
    walk.push(p);
    node = from[p];
  }
  // walk holds pairs leading backwards; the cycle is the part from the repeated element on
  const cyclePairs = Int32Array.from(walk.slice(visitedAt.get(node)!).reverse());
  const elements = Int32Array.from([...Array.from(cyclePairs, (p) => from[p]), from[cyclePairs[0]]]);
  return new RelationCycleError(cyclePairs, elements);
}

/** One cycle of the pairs from[p] ≺ to[p] on `count` elements, or null when they have none (Kahn's pass, then a backward walk). */
export function findCycle(count: number, from: Int32Array, to: Int32Array): RelationCycleError | null {
  checkPairs(count, from, to);
  const pass = kahnPass(count, from, to);
  return pass.placed < count ? cycleInRemainder(count, from, to, pass.indegree) : null;
}

/**
 * Transitive closure of the pairs from[p] ≺ to[p] on `count` elements, bit-packed. A topological order
 * comes first (Kahn 1962); if some elements never become free the pairs contain a cycle, thrown as a
 * RelationCycleError naming its pairs. Then, in reverse topological order, each element's future is the
 * union of its successors and their futures — one 32-bit word at a time, skipping successors already inside.
 */
export function transitiveClosure(count: number, from: Int32Array, to: Int32Array): BitRelation {
  checkPairs(count, from, to);
  const pairs = from.length;
  const { outStart, outPair, topo, placed, indegree } = kahnPass(count, from, to);
  if (placed < count) throw cycleInRemainder(count, from, to, indegree);

  // Successors again, now each element's in topological order: the earliest successor has the largest
  // future, and a later one already inside the row adds nothing (its row is closed and contained), so
  // only about the links of each element cost a row union.
  const rank = new Int32Array(count);
  for (let q = 0; q < count; q++) rank[topo[q]] = q;
  const byRankStart = new Int32Array(count + 1);
  for (let p = 0; p < pairs; p++) byRankStart[rank[to[p]] + 1] += 1;
  for (let q = 0; q < count; q++) byRankStart[q + 1] += byRankStart[q];
  const pairsByTargetRank = new Int32Array(pairs);
  for (let p = 0; p < pairs; p++) pairsByTargetRank[byRankStart[rank[to[p]]]++] = p;
  const fill = outStart.slice(0, count);
  for (let k = 0; k < pairs; k++) {
    const p = pairsByTargetRank[k];
    outPair[fill[from[p]]++] = p;
  }

  const closed = new BitRelation(count);
  const w = closed.wordsPerRow;
  const words = closed.words;
  for (let q = count - 1; q >= 0; q--) {
    const u = topo[q];
    const a = u * w;
    for (let k = outStart[u]; k < outStart[u + 1]; k++) {
      const v = to[outPair[k]];
      const bit = 1 << (v & 31);
      if (words[a + (v >>> 5)] & bit) continue;
      const b = v * w;
      for (let x = 0; x < w; x++) words[a + x] |= words[b + x];
      words[a + (v >>> 5)] |= bit;
    }
  }
  return closed;
}

/**
 * A labelling that respects ≺, read off a closed relation: i ≺ j makes the past of j strictly contain
 * the past of i (it holds i as well, the relation being transitive), so sorting by the size of the past
 * is a linear extension. Ties go by label, so the result is the same wherever it is computed.
 */
export function linearExtension(causal: BitRelation): Int32Array {
  const pastSize = new Int32Array(causal.size);
  causal.forEach((_i, j) => {
    pastSize[j] += 1;
  });
  return Int32Array.from({ length: causal.size }, (_, i) => i).sort((a, b) => pastSize[a] - pastSize[b] || a - b);
}

export interface OrderSummary {
  relations: number;
  links: number;
  orderingFraction: number;
  height: number;
  minimal: number;
  maximal: number;
  /** elements per layer, layer k = elements whose longest chain from below has k elements */
  layerSizes: number[];
}

/**
 * Order statistics of a closed relation: relations R, links, ordering fraction R / (N choose 2)
 * (Myrheim 1978; Meyer 1988), the height (elements in a longest chain) and the layers by longest chain
 * from below. Elements are visited in a linear extension, so each element's longest chain is known
 * before anything in its future needs it.
 */
/**
 * For each element the number of elements in a longest chain ending at it, and the height (the
 * longest of all), given the past relation and a linear extension to visit the elements in.
 */
export function longestChainsFromBelow(past: BitRelation, order: ArrayLike<number>): { chain: Int32Array; height: number } {
  const chain = new Int32Array(past.size);
  let height = 0;
  for (let k = 0; k < order.length; k++) {
    const j = order[k];
    let best = 0;
    rowForEach(past, j, (i) => {
      if (chain[i] > best) best = chain[i];
    });
    chain[j] = best + 1;
    if (chain[j] > height) height = chain[j];
  }
  return { chain, height };
}

export function orderSummary(causal: BitRelation): OrderSummary {
  const n = causal.size;
  const past = causal.transpose();
  const relations = causal.count();
  const { chain, height } = longestChainsFromBelow(past, linearExtension(causal));
  const layerSizes = new Array<number>(height).fill(0);
  for (let i = 0; i < n; i++) layerSizes[chain[i] - 1] += 1;
  let minimal = 0;
  let maximal = 0;
  for (let i = 0; i < n; i++) {
    if (rowIsEmpty(past, i)) minimal += 1;
    if (rowIsEmpty(causal, i)) maximal += 1;
  }
  return {
    relations,
    links: linkMatrix(causal).count(),
    orderingFraction: n > 1 ? relations / ((n * (n - 1)) / 2) : 0,
    height,
    minimal,
    maximal,
    layerSizes,
  };
}

function rowForEach(rel: BitRelation, i: number, visit: (j: number) => void): void {
  const w = rel.wordsPerRow;
  for (let k = 0; k < w; k++) {
    let bits = rel.words[i * w + k];
    while (bits !== 0) {
      const low = bits & -bits;
      visit((k << 5) + (31 - Math.clz32(low)));
      bits ^= low;
    }
  }
}

function rowIsEmpty(rel: BitRelation, i: number): boolean {
  const w = rel.wordsPerRow;
  for (let k = 0; k < w; k++) if (rel.words[i * w + k] !== 0) return false;
  return true;
}
