import type { DenseMatrix, LinearAlgebraBackend } from './linalg/backend';
import { denseMatrix, getBackend } from './linalg';
import { BitRelation, imageCount, linkMatrix, timeOrder } from './order';

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
  /**
   * period L of a cylinder x ~ x + L (2D, with the points `causal` was built from): K then counts the
   * images through which y ≺ x instead of being ½ Cᵀ
   */
  periodX?: number;
}

/** Weight of a link in the 4D massless K = (√ρ / (2π√6)) Lᵀ (Johnston 2009, PRL 103 180401). */
export function fourDimensionalLinkWeight(density: number): number {
  return Math.sqrt(density) / (2 * Math.PI * Math.sqrt(6));
}

/**
 * A massless K kept as its relation R, weight w and (on a cylinder) an integer multiplicity per pair,
 * without the N × N matrix: K[j][i] = w · multiplicity(i, j) for every pair i R j, 0 elsewhere; without
 * `multiplicity`, K = w Rᵀ.
 */
export interface WeightedRelation {
  relation: BitRelation;
  weight: number;
  /** number of images through which i ≺ j (≥ 1 on every pair of the relation); absent: 1 everywhere */
  multiplicity?: (i: number, j: number) => number;
}

/**
 * The massless retarded Green function as a weighted relation (Johnston 2008, CQG 25 202001; Johnston
 * 2009, PRL 103 180401): 2D K = ½ Cᵀ, 4D K = (√ρ / (2π√6)) Lᵀ. On the cylinder x ~ x + L (2D) the method
 * of images for the 2D wave equation gives K[x][y] = ½ · #{n ∈ ℤ : y + nL ≺ x}: the relation stays C and
 * each pair carries its image count (`imageCount`), which exceeds 1 once a diamond's proper time
 * passes L.
 */
export function masslessGreenRelation(input: GreenFunctionInput): WeightedRelation {
  if (input.periodX !== undefined) {
    const period = input.periodX;
    if (input.dimension !== 2) throw new RangeError('a periodic x (cylinder) is supported in 2D only');
    if (!(period > 0 && Number.isFinite(period))) throw new RangeError('the period of x must be a positive finite number');
    if (input.points.length !== 2 * input.causal.size) {
      throw new RangeError(`the cylinder Green function needs the coordinates of all ${input.causal.size} elements, got ${input.points.length / 2}`);
    }
    const points = input.points;
    return { relation: input.causal, weight: 0.5, multiplicity: (i, j) => imageCount(points, i, j, period) };
  }
  if (input.dimension === 2) return { relation: input.causal, weight: 0.5 };
  if (!(input.density !== undefined && input.density > 0)) throw new RangeError('the 4D Green function needs the density ρ');
  return { relation: input.links ?? linkMatrix(input.causal), weight: fourDimensionalLinkWeight(input.density) };
}

/**
 * The massless retarded Green function, K[x][y] ≠ 0 only for y ≺ x (Johnston 2008, CQG 25 202001;
 * Johnston 2009, PRL 103 180401): 2D K = ½ Cᵀ; 4D K = (√ρ / (2π√6)) Lᵀ; on the cylinder
 * K[x][y] = ½ · #{n : y + nL ≺ x} (method of images). Column-major N × N.
 */
export function masslessRetardedGreen(input: GreenFunctionInput): DenseMatrix {
  const n = input.causal.size;
  const k = denseMatrix(n, n);
  const { relation, weight, multiplicity } = masslessGreenRelation(input);
  if (multiplicity) {
    relation.forEach((i, j) => {
      k.data[j + i * n] = weight * multiplicity(i, j);
    });
  } else {
    relation.forEach((i, j) => {
      k.data[j + i * n] = weight;
    });
  }
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
 * The retarded Green function of a field of mass m (Johnston 2008/2009): with Φ the massless K (on the
 * cylinder the image-counted one),
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
