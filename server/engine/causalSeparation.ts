import type { BitRelation } from './order';

/**
 * Where an element set sits in the causal order of the whole set: the two questions the mutual
 * information and the complement check of server/engine/README.md §15 ask of a subregion O — is an
 * element in the causal future or past of O (related to some element of O), and which elements are
 * unrelated to all of O. Two ways to answer them: the bit rows of the causal relation (dense engine,
 * relation lists, the cylinder), or light-cone coordinates in flat 2D (structured engine), where the
 * future of O is bounded by a staircase and a query costs O(log n).
 */
export interface CausalNeighbourhood {
  /** whether e is related to some element of O (o ≺ e or e ≺ o) */
  relatedToSet(e: number): boolean;
}

/** The future and past of O from the bit rows of the closed relation C (bit j of row i: i ≺ j). */
export function relationNeighbourhood(relation: BitRelation, elements: ArrayLike<number>): CausalNeighbourhood {
  const w = relation.wordsPerRow;
  const rows = relation.words;
  const member = new Uint32Array(w);
  const future = new Uint32Array(w);
  for (let p = 0; p < elements.length; p++) {
    const o = elements[p];
    member[o >>> 5] |= 1 << (o & 31);
    const offset = o * w;
    for (let k = 0; k < w; k++) future[k] |= rows[offset + k];
  }
  return {
    relatedToSet(e: number): boolean {
      if (future[e >>> 5] & (1 << (e & 31))) return true;
      // e ≺ o for some o in O: row e meets O
      const offset = e * w;
      for (let k = 0; k < w; k++) if (rows[offset + k] & member[k]) return true;
      return false;
    },
  };
}

/**
 * The future and past of O in flat 2D from light-cone coordinates u = t + x, v = t − x (§1: i ≺ j iff
 * u_i < u_j and v_i < v_j). Sorted by u, the running minimum of v over the elements of O with u below
 * u_e decides whether e lies in the future of O, the running maximum of v over those above u_e whether
 * it lies in the past: a staircase, built in O(n log n) and asked in O(log n).
 */
export function lightConeNeighbourhood(points: ArrayLike<number>, elements: ArrayLike<number>): CausalNeighbourhood {
  const n = elements.length;
  const u = (i: number) => points[2 * i] + points[2 * i + 1];
  const v = (i: number) => points[2 * i] - points[2 * i + 1];
  const byU = Array.from(elements, (o) => ({ u: u(o), v: v(o) })).sort((p, q) => p.u - q.u);
  const us = Float64Array.from(byU, (p) => p.u);
  const minVBelow = new Float64Array(n);
  const maxVAbove = new Float64Array(n);
  for (let p = 0; p < n; p++) minVBelow[p] = Math.min(byU[p].v, p > 0 ? minVBelow[p - 1] : Infinity);
  for (let p = n - 1; p >= 0; p--) maxVAbove[p] = Math.max(byU[p].v, p < n - 1 ? maxVAbove[p + 1] : -Infinity);
  // the number of elements of O with u strictly below (or, with `orEqual`, at most) the given value
  const countBelow = (value: number, orEqual: boolean) => {
    let lo = 0;
    let hi = n;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (us[mid] < value || (orEqual && us[mid] === value)) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  return {
    relatedToSet(e: number): boolean {
      const ue = u(e);
      const ve = v(e);
      const below = countBelow(ue, false);
      if (below > 0 && minVBelow[below - 1] < ve) return true;
      const above = countBelow(ue, true);
      return above < n && maxVAbove[above] > ve;
    },
  };
}

/** An element of `b` related to some element of the set the neighbourhood was built on, or −1. */
export function firstRelated(neighbourhood: CausalNeighbourhood, b: ArrayLike<number>): number {
  for (let q = 0; q < b.length; q++) if (neighbourhood.relatedToSet(b[q])) return b[q];
  return -1;
}

/**
 * The causal complement O′ of O among the `size` elements of the set: the elements outside O that are
 * unrelated to every element of O (server/engine/README.md §15), ascending.
 */
export function causalComplement(neighbourhood: CausalNeighbourhood, elements: ArrayLike<number>, size: number): Int32Array {
  const inside = new Uint8Array(size);
  for (let p = 0; p < elements.length; p++) inside[elements[p]] = 1;
  const complement: number[] = [];
  for (let e = 0; e < size; e++) if (!inside[e] && !neighbourhood.relatedToSet(e)) complement.push(e);
  return Int32Array.from(complement);
}
