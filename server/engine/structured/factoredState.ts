import type { DenseMatrix } from '../linalg/backend';
import { denseMatrix } from '../linalg';
import type { SjState } from '../sjState';
import type { SkewPairs } from './lanczos';

/**
 * The truncated SJ state kept as N × k factors, never as an N × N matrix (physics notes §4).
 * With orthonormal pairs Δ a_i = σ_i b_i, Δ b_i = −σ_i a_i for the k kept σ_i > λ_c:
 *   |Δ|_c = Σ σ_i (a_i a_iᵀ + b_i b_iᵀ),  Δ_c = Σ σ_i (b_i a_iᵀ − a_i b_iᵀ),
 *   W_c = ½(|Δ|_c + iΔ_c) = Σ σ_i e_i e_i†  with e_i = (a_i − i b_i)/√2,
 * so iΔ e_i = σ_i e_i: the e_i are the positive-frequency modes (Sorkin 2011; Johnston 2009). Memory is
 * 2kN doubles, e.g. about 1 GB for N = 100 000 with the √N/(4π) cut.
 */
export interface FactoredSjState {
  size: number;
  /** positive eigenvalues of iΔ kept, descending */
  sigma: Float64Array;
  a: Float64Array[];
  b: Float64Array[];
  /** the cut λ_c the modes were selected with */
  cutoff: number;
}

export function factoredState(pairs: SkewPairs, cutoff: number): FactoredSjState {
  return { size: pairs.size, sigma: pairs.sigma, a: pairs.a, b: pairs.b, cutoff };
}

/** tr W_c = Σ σ_i (each e_i is a unit vector), what physics notes §4 asks to equal the kept positive eigenvalues. */
export function factoredTrace(state: FactoredSjState): number {
  let trace = 0;
  for (let i = 0; i < state.sigma.length; i++) {
    const a = state.a[i];
    const b = state.b[i];
    let s = 0;
    for (let r = 0; r < state.size; r++) s += a[r] * a[r] + b[r] * b[r];
    trace += 0.5 * state.sigma[i] * s;
  }
  return trace;
}

/** Re W_c and Im W_c applied to a real vector: ½|Δ|_c w and ½Δ_c w, O(Nk). */
export function applyWightman(state: FactoredSjState, w: Float64Array): { real: Float64Array; imaginary: Float64Array } {
  const n = state.size;
  const real = new Float64Array(n);
  const imaginary = new Float64Array(n);
  for (let i = 0; i < state.sigma.length; i++) {
    const a = state.a[i];
    const b = state.b[i];
    let pa = 0;
    let pb = 0;
    for (let r = 0; r < n; r++) {
      pa += a[r] * w[r];
      pb += b[r] * w[r];
    }
    const s = 0.5 * state.sigma[i];
    for (let r = 0; r < n; r++) {
      real[r] += s * (pa * a[r] + pb * b[r]);
      imaginary[r] += s * (pa * b[r] - pb * a[r]);
    }
  }
  return { real, imaginary };
}

/**
 * The same state in the dense engine's form (basis columns a_1, b_1, a_2, b_2, …, each σ twice, and
 * BᵀΔB = block diagonal [[0, −σ], [σ, 0]], ΔB from Δa = σb, Δb = −σa), so the dense checks and entropy can run on it; only for
 * sizes where an N × N Δ is affordable.
 */
export function toDenseSjState(state: FactoredSjState, delta: DenseMatrix): SjState {
  const n = state.size;
  const k = state.sigma.length;
  const basis = denseMatrix(n, 2 * k);
  const sigma = new Float64Array(2 * k);
  const deltaInBasis = denseMatrix(2 * k, 2 * k);
  const deltaTimesBasis = denseMatrix(n, 2 * k);
  for (let i = 0; i < k; i++) {
    basis.data.set(state.a[i], 2 * i * n);
    basis.data.set(state.b[i], (2 * i + 1) * n);
    for (let r = 0; r < n; r++) {
      deltaTimesBasis.data[r + 2 * i * n] = state.sigma[i] * state.b[i][r];
      deltaTimesBasis.data[r + (2 * i + 1) * n] = -state.sigma[i] * state.a[i][r];
    }
    sigma[2 * i] = state.sigma[i];
    sigma[2 * i + 1] = state.sigma[i];
    deltaInBasis.data[2 * i + 1 + 2 * i * 2 * k] = state.sigma[i];
    deltaInBasis.data[2 * i + (2 * i + 1) * 2 * k] = -state.sigma[i];
  }
  return { size: n, complete: false, modesKept: k, cutoff: state.cutoff, basis, sigma, deltaInBasis, delta, deltaTimesBasis };
}
