import type { DenseMatrix, LinearAlgebraBackend } from '../linalg/backend';
import { denseMatrix, getBackend } from '../linalg';
import type { SjDiagnostics } from '../sjDiagnostics';
import type { SjState } from '../sjState';
import { asOneMatrix } from './basis';
import type { SkewPairs } from './lanczos';

/**
 * The truncated SJ state kept as N × k factors, never as an N × N matrix (server/engine/README.md §5, §12).
 * With orthonormal pairs Δ a_i = σ_i b_i, Δ b_i = −σ_i a_i for the k kept σ_i > λ_c:
 *   |Δ|_c = Σ σ_i (a_i a_iᵀ + b_i b_iᵀ),  Δ_c = Σ σ_i (b_i a_iᵀ − a_i b_iᵀ),
 *   W_c = ½(|Δ|_c + iΔ_c) = Σ σ_i e_i e_i†  with e_i = (a_i + i b_i)/√2,
 * so iΔ e_i = iσ_i b_i + σ_i a_i = σ_i e_i: the e_i are the positive-frequency modes (Sorkin 2011;
 * Johnston 2009), while (a_i − i b_i)/√2 has eigenvalue −σ_i. Memory is
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

/** tr W_c = Σ σ_i (each e_i is a unit vector), what server/engine/README.md §5 asks to equal the kept positive eigenvalues. */
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

/**
 * The checks of server/engine/README.md §5 on the factored state, in the same form as the dense engine's
 * `sjDiagnostics` (../sjDiagnostics.ts), from the one Gram product H = FᵀF of F = [a_1, b_1, a_2, b_2, …]
 * (O(N k²), dsyrk on native) and the Lanczos residuals:
 * - W_c = E S E† with S = diag(σ) ≥ 0 is Hermitian and positive semidefinite by construction, and has a
 *   kernel (rank k < N): smallest eigenvalue 0 exactly, Hermiticity error 0 exactly.
 * - W − W̄ = iΔ_c holds by construction; what can fail is Δ_c = Δ on the kept span, so commutatorError is
 *   ‖Δ P − Δ_c‖_F bounded by √(Σ σ_i² (r_a,i² + r_b,i²)) from the residuals, relative to ‖Δ_c‖_F = √(2Σσ²)
 *   (the structured engine never forms Δ, so its Frobenius norm is not at hand).
 * - W W̄ = E S (E†Ē) S Eᵀ: with e_i = (a_i + i b_i)/√2, e_i†ē_j = ½(a_iᵀa_j − b_iᵀb_j − i(a_iᵀb_j + b_iᵀa_j)),
 *   zero for exact pairs; orthogonalityError = ‖S (E†Ē) S‖_F / ‖S‖_F² (only |e_i†ē_j|² enters it, so
 *   the sign of the imaginary part does not matter there).
 * - tr W_c = ½ Σ σ_i (‖a_i‖² + ‖b_i‖²) against Σ σ_i, and ‖H − I‖_F.
 */
export function factoredDiagnostics(state: FactoredSjState, relativeResiduals: Float64Array, backend: LinearAlgebraBackend = getBackend()): SjDiagnostics {
  const n = state.size;
  const k = state.sigma.length;
  const width = 2 * k;
  // F = [a_1, b_1, a_2, b_2, …]: the Lanczos pairs come as consecutive columns of one buffer, so this is
  // no copy of the N × 2k factors (1 GB at N = 100 000)
  const columns: Float64Array[] = [];
  for (let i = 0; i < k; i++) columns.push(state.a[i], state.b[i]);
  const h = backend.gram({ rows: n, cols: width, data: asOneMatrix(columns, n) }).data;
  const at = (r: number, c: number) => h[r + c * width];
  let offIdentity = 0;
  let trace = 0;
  let sum = 0;
  let sigmaSquares = 0;
  let residualSquares = 0;
  let wwBar = 0;
  for (let i = 0; i < k; i++) {
    const s = state.sigma[i];
    trace += 0.5 * s * (at(2 * i, 2 * i) + at(2 * i + 1, 2 * i + 1));
    sum += s;
    sigmaSquares += s * s;
    residualSquares += 2 * (s * relativeResiduals[i]) ** 2;
    for (let j = 0; j < k; j++) {
      const re = 0.5 * (at(2 * i, 2 * j) - at(2 * i + 1, 2 * j + 1));
      const im = 0.5 * (at(2 * i, 2 * j + 1) + at(2 * i + 1, 2 * j));
      wwBar += (s * state.sigma[j]) ** 2 * (re * re + im * im);
    }
  }
  for (let c = 0; c < width; c++) for (let r = 0; r < width; r++) offIdentity += (at(r, c) - (r === c ? 1 : 0)) ** 2;
  return {
    hermiticityError: 0,
    smallestEigenvalue: 0,
    smallestEigenvalueMethod: 'exact',
    commutatorError: sigmaSquares > 0 ? Math.sqrt(residualSquares / (2 * sigmaSquares)) : 0,
    orthogonalityError: sigmaSquares > 0 ? Math.sqrt(wwBar) / sigmaSquares : 0,
    trace,
    positiveEigenvalueSum: sum,
    basisOrthonormalityError: Math.sqrt(offIdentity),
    checkMethod: 'exact',
    probeCount: 0,
  };
}
