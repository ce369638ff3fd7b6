import type { DenseMatrix, LinearAlgebraBackend } from './linalg/backend';
import { denseMatrix, getBackend } from './linalg';
import { BitRelation, linkMatrix, timeOrder } from './order';

export interface GreenFunctionInput {
  points: ArrayLike<number>;
  dimension: 2 | 4;
  causal: BitRelation;
  /** links, needed in 4D; computed from `causal` when absent */
  links?: BitRelation;
  /** ρ, needed for a massive field and for the 4D normalisation */
  density?: number;
  mass?: number;
  backend?: LinearAlgebraBackend;
  /** an order of the elements that respects ≺, for sets without coordinates; default: sorted by t */
  linearExtension?: ArrayLike<number>;
}

/** Weight of a link in the 4D massless K = (√ρ / (2π√6)) Lᵀ (Johnston 2009, PRL 103 180401). */
export function fourDimensionalLinkWeight(density: number): number {
  return Math.sqrt(density) / (2 * Math.PI * Math.sqrt(6));
}

/** A massless K = w Rᵀ kept as its relation R and weight w, without the N × N matrix. */
export interface WeightedRelation {
  relation: BitRelation;
  weight: number;
}

/**
 * The massless retarded Green function as a weighted relation, K = w Rᵀ (Johnston 2008, CQG 25 202001;
 * Johnston 2009, PRL 103 180401): 2D R = C, w = ½; 4D R = L, w = √ρ / (2π√6).
 */
export function masslessGreenRelation(input: GreenFunctionInput): WeightedRelation {
  if (input.dimension === 2) return { relation: input.causal, weight: 0.5 };
  if (!(input.density !== undefined && input.density > 0)) throw new RangeError('the 4D Green function needs the density ρ');
  return { relation: input.links ?? linkMatrix(input.causal), weight: fourDimensionalLinkWeight(input.density) };
}

/**
 * The massless retarded Green function, K[x][y] ≠ 0 only for y ≺ x (Johnston 2008, CQG 25 202001;
 * Johnston 2009, PRL 103 180401): 2D K = ½ Cᵀ; 4D K = (√ρ / (2π√6)) Lᵀ. Column-major N × N.
 */
export function masslessRetardedGreen(input: GreenFunctionInput): DenseMatrix {
  const n = input.causal.size;
  const k = denseMatrix(n, n);
  const { relation, weight } = masslessGreenRelation(input);
  relation.forEach((i, j) => {
    k.data[j + i * n] = weight;
  });
  return k;
}

/**
 * K as the pipeline needs it: massless, the weighted relation (Δ is then built from it directly,
 * saving an N × N matrix and its transposition); massive, the dense `retardedGreen`.
 */
export function retardedGreenOperator(input: GreenFunctionInput): DenseMatrix | WeightedRelation {
  return (input.mass ?? 0) === 0 ? masslessGreenRelation(input) : retardedGreen(input);
}

/**
 * The retarded Green function of a field of mass m (Johnston 2008/2009): with Φ the massless K,
 * K_m = Φ (I + (m²/ρ) Φ)⁻¹ = (I + (m²/ρ) Φ)⁻¹ Φ (the two factors commute). In an order of the elements
 * that respects ≺ (sorted by t) Φ is strictly lower triangular, so (I + (m²/ρ)Φ) X = Φ is solved by
 * forward substitution with a unit diagonal — no inverse is ever formed.
 */
export function retardedGreen(input: GreenFunctionInput): DenseMatrix {
  const phi = masslessRetardedGreen(input);
  const mass = input.mass ?? 0;
  if (mass === 0) return phi;
  if (!(mass > 0) || !Number.isFinite(mass)) throw new RangeError('mass must be a finite number ≥ 0');
  if (!(input.density !== undefined && input.density > 0)) throw new RangeError('a massive field needs the density ρ');
  const backend = input.backend ?? getBackend();
  const n = phi.rows;
  const order = input.linearExtension ?? timeOrder(input.points, input.dimension);
  const sortedPhi = denseMatrix(n, n);
  const system = denseMatrix(n, n);
  const coupling = (mass * mass) / input.density;
  for (let q = 0; q < n; q++) {
    const col = order[q] * n;
    for (let p = 0; p < n; p++) {
      const v = phi.data[order[p] + col];
      sortedPhi.data[p + q * n] = v;
      system.data[p + q * n] = coupling * v;
    }
  }
  for (let p = 0; p < n; p++) system.data[p + p * n] = 1;
  const sortedK = backend.solveTriangular(system, sortedPhi, { lower: true, unitDiagonal: true });
  const k = denseMatrix(n, n);
  for (let q = 0; q < n; q++) {
    const col = order[q] * n;
    for (let p = 0; p < n; p++) k.data[order[p] + col] = sortedK.data[p + q * n];
  }
  return k;
}
