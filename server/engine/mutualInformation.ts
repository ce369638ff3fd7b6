import { firstRelated, type CausalNeighbourhood } from './causalSeparation';
import type { EntropyResult } from './entropy';

export interface MutualInformationResult {
  a: EntropyResult & { elements: Int32Array };
  b: EntropyResult & { elements: Int32Array };
  union: EntropyResult & { elements: Int32Array };
  /** I(A:B) = S_A + S_B − S_{A∪B} */
  I: number;
}

/** Where two element sets cannot give a mutual information: shared elements, or an element of one related to one of the other. */
export interface PairIssue {
  kind: 'overlap' | 'related';
  message: string;
}

/**
 * Whether A and B are disjoint and spacelike to each other in the causal order, as the mutual
 * information of server/engine/README.md §15 asks (null when they are). The order is given either as
 * `precedes(i, j)`, i ≺ j in the whole set (|A|·|B| questions), or as the causal neighbourhood of A
 * (causalSeparation.ts: bit rows or a light-cone staircase, one question per element of B).
 */
export function pairIssue(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  order: ((i: number, j: number) => boolean) | CausalNeighbourhood,
): PairIssue | null {
  const inA = new Set(Array.from(a));
  const shared = Array.from(b).filter((j) => inA.has(j));
  if (shared.length > 0) {
    return { kind: 'overlap', message: `A and B overlap: ${shared.length} element(s) lie in both (element ${shared[0]} is one); the mutual information needs disjoint subregions` };
  }
  if (typeof order !== 'function') {
    const j = firstRelated(order, b);
    return j < 0
      ? null
      : { kind: 'related', message: `A and B are causally related (element ${j} of B is related to an element of A); the mutual information needs spacelike-separated subregions` };
  }
  for (let p = 0; p < a.length; p++) {
    for (let q = 0; q < b.length; q++) {
      const i = a[p];
      const j = b[q];
      if (order(i, j) || order(j, i)) {
        return { kind: 'related', message: `A and B are causally related (element ${i} of A and element ${j} of B are related); the mutual information needs spacelike-separated subregions` };
      }
    }
  }
  return null;
}

/** The sorted union of two disjoint element lists. */
export function unionElements(a: ArrayLike<number>, b: ArrayLike<number>): Int32Array {
  const union = new Int32Array(a.length + b.length);
  union.set(Array.from(a));
  union.set(Array.from(b), a.length);
  return union.sort();
}

/**
 * Mutual information I(A:B) = S_A + S_B − S_{A∪B} of two disjoint, spacelike subregions on one state
 * (server/engine/README.md §15). `entropyOf` is the engine's entropy of an element list on that state
 * (dense: entanglementEntropy, structured: factoredEntropy) with the rule of the request; under double
 * truncation it cuts each of A, B and A∪B at its own restricted cut (√n/(4π) with its own n).
 */
export function mutualInformation(
  entropyOf: (elements: Int32Array) => EntropyResult,
  a: Int32Array,
  b: Int32Array,
): MutualInformationResult {
  const union = unionElements(a, b);
  const sa = { ...entropyOf(a), elements: a };
  const sb = { ...entropyOf(b), elements: b };
  const sab = { ...entropyOf(union), elements: union };
  return { a: sa, b: sb, union: sab, I: sa.S + sb.S - sab.S };
}
