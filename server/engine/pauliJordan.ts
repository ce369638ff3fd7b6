import type { DenseMatrix, LinearAlgebraBackend } from './linalg/backend';
import { denseMatrix, getBackend } from './linalg';
import type { WeightedRelation } from './green';

/**
 * Δ = K − Kᵀ, real antisymmetric (Johnston 2009; Sorkin 2011): iΔ is the Pauli–Jordan operator. K is
 * dense, or a massless K = w Rᵀ given by its relation (with a per-pair image count on the cylinder),
 * when Δ is written pair by pair.
 */
export function pauliJordan(k: DenseMatrix | WeightedRelation): DenseMatrix {
  if ('relation' in k) return pauliJordanOfRelation(k);
  const n = k.rows;
  const delta = denseMatrix(n, n);
  // tiles of 64 × 64 keep the transposed reads in cache (a plain double loop misses on every one at N ≳ 1000)
  const tile = 64;
  for (let jb = 0; jb < n; jb += tile) {
    const jEnd = Math.min(jb + tile, n);
    for (let ib = 0; ib < n; ib += tile) {
      const iEnd = Math.min(ib + tile, n);
      for (let j = jb; j < jEnd; j++) for (let i = ib; i < iEnd; i++) delta.data[i + j * n] = k.data[i + j * n] - k.data[j + i * n];
    }
  }
  return delta;
}

/**
 * Δ = K − Kᵀ from K[j][i] = w m(i, j): Δ[j][i] = w m and Δ[i][j] = −w m for every pair i R j (m = 1
 * without a multiplicity, i.e. Δ = w(Rᵀ − R)).
 */
function pauliJordanOfRelation({ relation, weight, multiplicity }: WeightedRelation): DenseMatrix {
  const n = relation.size;
  const delta = denseMatrix(n, n);
  if (multiplicity) {
    relation.forEach((i, j) => {
      const v = weight * multiplicity(i, j);
      delta.data[j + i * n] = v;
      delta.data[i + j * n] = -v;
    });
    return delta;
  }
  relation.forEach((i, j) => {
    delta.data[j + i * n] = weight;
    delta.data[i + j * n] = -weight;
  });
  return delta;
}

export interface PauliJordanSpectrum {
  size: number;
  /** eigenvalues σ² of ΔᵀΔ, descending (largest first); each nonzero one appears twice */
  gramValues: Float64Array;
  /**
   * unit eigenvectors of ΔᵀΔ, column k belongs to gramValues[k] (largest first, so the modes a
   * truncation keeps are the leading columns and a state can use them without a copy); null when not
   * asked for
   */
  gramVectors: DenseMatrix | null;
  /** the ⌊N/2⌋ positive eigenvalues of iΔ, descending */
  positive: Float64Array;
  /**
   * true when the σ came from Δ itself (the skew route: column pairs 2k, 2k + 1 with Δa = σb, σ to about
   * ε‖Δ‖), false when they are square roots of the eigenvalues of ΔᵀΔ
   */
  sigmaExact?: boolean;
}

/**
 * Positive eigenvalues from the paired eigenvalues σ² of ΔᵀΔ: counting down from the top, entries
 * 2j and 2j+1 are the two copies of one σ², so λ_j = √(mean of the pair). Used for Δ and for every
 * restriction of it.
 */
export function pairedSingularValues(ascendingGramValues: Float64Array): Float64Array {
  const n = ascendingGramValues.length;
  const pairs = Math.floor(n / 2);
  const out = new Float64Array(pairs);
  for (let j = 0; j < pairs; j++) {
    const mean = (ascendingGramValues[n - 1 - 2 * j] + ascendingGramValues[n - 2 - 2 * j]) / 2;
    out[j] = Math.sqrt(Math.max(mean, 0));
  }
  return out;
}

/**
 * Spectrum of iΔ in real arithmetic (server/engine/README.md §5–§6; Afshordi–Aslanbeigi–Sorkin 2012): iΔ has
 * eigenvalues ±σ where σ² are the eigenvalues of the real symmetric positive semidefinite ΔᵀΔ = −Δ², so
 * one symmetric eigendecomposition gives both the spectrum and, through its eigenvectors, the SJ state.
 * Accuracy: σ comes out to about ε‖Δ‖²/σ, excellent above the knee, poor for near-zero modes.
 * When the backend reduces an antisymmetric matrix itself (`skewSpectrum`, native, N even) and vectors
 * are wanted, Δ goes there instead (`route: 'skew'`, the default where it applies): the same eigenvectors
 * of ΔᵀΔ, paired so that Δa = σb and Δb = −σa, without the Gram product, and each σ to about ε‖Δ‖.
 * `route: 'gram'` forces ΔᵀΔ.
 */
export function pauliJordanSpectrum(
  delta: DenseMatrix,
  options: { vectors?: boolean; backend?: LinearAlgebraBackend; route?: 'skew' | 'gram' } = {},
): PauliJordanSpectrum {
  const backend = options.backend ?? getBackend();
  const vectors = options.vectors !== false;
  const n = delta.rows;
  if (vectors && options.route !== 'gram' && backend.skewSpectrum && n >= 2 && n % 2 === 0) {
    const { sigma, vectors: pairs } = backend.skewSpectrum(delta);
    const gramValues = new Float64Array(n);
    for (let k = 0; k < sigma.length; k++) gramValues[2 * k] = gramValues[2 * k + 1] = sigma[k] * sigma[k];
    return { size: n, gramValues, gramVectors: pairs, positive: sigma, sigmaExact: true };
  }
  const gram = backend.gram(delta);
  const eig = backend.symmetricEigen(gram, { vectors, overwriteInput: true });
  const positive = pairedSingularValues(eig.values);
  eig.values.reverse();
  if (eig.vectors) reverseColumns(eig.vectors);
  return { size: n, gramValues: eig.values, gramVectors: eig.vectors, positive, sigmaExact: false };
}

/** Reverses the column order of a column-major matrix in place. */
function reverseColumns(m: DenseMatrix): void {
  const rows = m.rows;
  const swap = new Float64Array(rows);
  for (let left = 0, right = m.cols - 1; left < right; left++, right--) {
    const a = m.data.subarray(left * rows, (left + 1) * rows);
    const b = m.data.subarray(right * rows, (right + 1) * rows);
    swap.set(a);
    a.set(b);
    b.set(swap);
  }
}
