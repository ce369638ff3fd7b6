import { precedes } from './regions';

/**
 * A binary relation on N elements as bit-packed rows: bit j of row i is set iff (i, j) is in the
 * relation. N²/8 bytes instead of 8N² for a dense float matrix, and row intersections run 32 pairs at
 * a time (used for links).
 */
export class BitRelation {
  readonly size: number;
  readonly wordsPerRow: number;
  readonly words: Uint32Array;

  constructor(size: number) {
    this.size = size;
    this.wordsPerRow = (size + 31) >>> 5;
    this.words = new Uint32Array(this.wordsPerRow * size);
  }

  /** A relation on `size` elements from its packed rows (⌈size/32⌉ words per row), as stored or imported. */
  static fromWords(words: Uint32Array, size: number): BitRelation {
    const relation = new BitRelation(size);
    if (words.length !== relation.words.length) throw new RangeError(`a relation on ${size} elements has ${relation.words.length} words, got ${words.length}`);
    relation.words.set(words);
    return relation;
  }

  has(i: number, j: number): boolean {
    return (this.words[i * this.wordsPerRow + (j >>> 5)] & (1 << (j & 31))) !== 0;
  }

  set(i: number, j: number): void {
    this.words[i * this.wordsPerRow + (j >>> 5)] |= 1 << (j & 31);
  }

  /** number of pairs in the relation */
  count(): number {
    let total = 0;
    for (let k = 0; k < this.words.length; k++) total += popcount(this.words[k]);
    return total;
  }

  transpose(): BitRelation {
    const t = new BitRelation(this.size);
    this.forEach((i, j) => t.set(j, i));
    return t;
  }

  /** calls visit(i, j) for every pair, row by row */
  forEach(visit: (i: number, j: number) => void): void {
    const w = this.wordsPerRow;
    for (let i = 0; i < this.size; i++) {
      for (let k = 0; k < w; k++) {
        let bits = this.words[i * w + k];
        while (bits !== 0) {
          const low = bits & -bits;
          visit(i, (k << 5) + (31 - Math.clz32(low)));
          bits ^= low;
        }
      }
    }
  }
}

/** Set bits of a 32-bit word. */
export function popcount(x: number): number {
  x -= (x >>> 1) & 0x55555555;
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333);
  x = (x + (x >>> 4)) & 0x0f0f0f0f;
  return Math.imul(x, 0x01010101) >>> 24;
}

/**
 * Causal matrix C[i][j] = 1 iff i ≺ j (server/engine/README.md §1), for points from a sprinkling or from outside.
 * `periodX` makes x periodic: the relation is then through the image points on the universal cover.
 */
export function causalMatrix(points: ArrayLike<number>, dimension: 2 | 4, periodX?: number): BitRelation {
  const n = points.length / dimension;
  if (!Number.isInteger(n)) throw new RangeError(`point array length ${points.length} is not a multiple of ${dimension}`);
  const c = new BitRelation(n);
  if (dimension === 2 && periodX === undefined) {
    // the common case inlined (N² pairs): i ≺ j iff t_j − t_i > |x_j − x_i|, as `precedes` says
    const words = c.words;
    const w = c.wordsPerRow;
    for (let i = 0; i < n; i++) {
      const ti = points[2 * i];
      const xi = points[2 * i + 1];
      const row = i * w;
      for (let j = 0; j < n; j++) {
        const dt = points[2 * j] - ti;
        if (dt > 0 && dt > Math.abs(points[2 * j + 1] - xi)) words[row + (j >>> 5)] |= 1 << (j & 31);
      }
    }
    return c;
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) if (j !== i && precedes(points, dimension, i, j, periodX)) c.set(i, j);
  }
  return c;
}

// the cylinder's image count lives with its geometry; order.ts keeps offering it
export { imageCount } from './regions';

/**
 * Link matrix L[i][j] = 1 iff i ≺ j with nothing between (server/engine/README.md §1): the pair (i, j) of C is a
 * link iff the future of i and the past of j share no element, tested one 32-bit word at a time.
 */
export function linkMatrix(causal: BitRelation): BitRelation {
  const past = causal.transpose();
  const n = causal.size;
  const w = causal.wordsPerRow;
  const links = new BitRelation(n);
  const fw = causal.words;
  const pw = past.words;
  causal.forEach((i, j) => {
    const a = i * w;
    const b = j * w;
    for (let k = 0; k < w; k++) if ((fw[a + k] & pw[b + k]) !== 0) return;
    links.set(i, j);
  });
  return links;
}

/** Element labels sorted by time: a linear extension of ≺, since i ≺ j implies t_i < t_j. */
export function timeOrder(points: ArrayLike<number>, dimension: 2 | 4): Int32Array {
  const n = points.length / dimension;
  const order = Int32Array.from({ length: n }, (_, i) => i);
  order.sort((a, b) => points[a * dimension] - points[b * dimension] || a - b);
  return order;
}
