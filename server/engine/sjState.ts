import type { DenseMatrix, LinearAlgebraBackend } from './linalg/backend';
import { denseMatrix, getBackend } from './linalg';
import type { PauliJordanSpectrum } from './pauliJordan';

/**
 * The (possibly truncated) SJ state in the basis of the kept eigenvectors of ΔᵀΔ. With B the N × r
 * matrix of kept eigenvectors (orthonormal columns), s their σ = √(eigenvalue of ΔᵀΔ) and
 * A = Bᵀ Δ B (r × r):
 *   Re W_c = ½ B diag(s) Bᵀ = ½ P|Δ|P,   Im W_c = ½ B A Bᵀ = ½ P Δ P,   P = B Bᵀ,
 * so W_c = B W̃ Bᵀ with the small Hermitian W̃ = ½(diag(s) + iA) (server/engine/README.md §5; Sorkin 2011;
 * Afshordi–Aslanbeigi–Sorkin 2012). Untruncated, B holds every eigenvector and Δ itself is used:
 * Im W = ½Δ, and Re W = ½|Δ| is restricted as ¼(B s Bᵀ + Δ B s⁺ Bᵀ Δᵀ), the mean of two forms that
 * agree for exact eigenvectors and whose first-order rounding cancels where it would show as entropy
 * of a pure state (`completeRestrictedReal`); a truncated Re W_c is restricted as the same mean in the
 * kept basis, B ¼(s + A s⁺ Aᵀ) Bᵀ (`truncatedRestrictedReal`). Nothing of size N × N beyond B is
 * formed for the state (A and ΔB are left null when untruncated; `sjDiagnostics` in sjDiagnostics.ts
 * forms what its checks need). The checks test the form ½ B s Bᵀ, which differs from the mean by
 * rounding (1e-11 of ‖Re W‖_F at N = 2000 untruncated).
 */
export interface SjState {
  size: number;
  /** true when every mode is kept (no truncation): then Δ_c = Δ */
  complete: boolean;
  /** positive modes kept (pairs of eigenvectors of ΔᵀΔ) */
  modesKept: number;
  cutoff: number;
  /** the leading r eigenvectors of ΔᵀΔ: a view into the spectrum's storage (shared, never written) */
  basis: DenseMatrix;
  sigma: Float64Array;
  /** A = Bᵀ Δ B; null when `complete` (the state then uses Δ itself) */
  deltaInBasis: DenseMatrix | null;
  /** Δ of the whole causal set */
  delta: DenseMatrix;
  /** Δ B (N × r), kept for the diagnostics; null when `complete` */
  deltaTimesBasis: DenseMatrix | null;
}

/**
 * σ/σ_max below which a mode of ΔᵀΔ is taken as an exact zero: rounding puts true zeros near
 * √ε ≈ 1e-8 of σ_max, while genuine modes in the reference data stay above 5e-4 (server/engine/README.md §6).
 */
export const KERNEL_RESOLUTION = 1e-6;

/** The leading `count` columns of the eigenvector matrix (largest eigenvalues), as a view: no copy. */
function leadingColumns(vectors: DenseMatrix, count: number): DenseMatrix {
  return { rows: vectors.rows, cols: count, data: vectors.data.subarray(0, vectors.rows * count) };
}

/**
 * Builds the SJ state of Δ keeping the `modesKept` largest positive modes (all of them when `complete`).
 * Keeping whole pairs of eigenvectors of ΔᵀΔ (the two copies of each σ²) makes P commute with Δ even
 * inside a degenerate pair.
 */
export function sjState(
  delta: DenseMatrix,
  spectrum: PauliJordanSpectrum,
  truncation: { modesKept: number; cutoff: number },
  backend: LinearAlgebraBackend = getBackend(),
): SjState {
  if (!spectrum.gramVectors) throw new Error('the SJ state needs the eigenvectors of ΔᵀΔ');
  const n = spectrum.size;
  const complete = truncation.modesKept >= spectrum.positive.length;
  const r = complete ? n : 2 * truncation.modesKept;
  const basis = leadingColumns(spectrum.gramVectors, r);
  const sigma = new Float64Array(r);
  const top = Math.sqrt(Math.max(spectrum.gramValues[0] ?? 0, 0));
  for (let c = 0; c < r; c++) {
    // the skew route gives σ itself (column pair 2k, 2k + 1 belongs to positive[k]); no square root to round
    const value = spectrum.sigmaExact ? spectrum.positive[c >> 1] : Math.sqrt(Math.max(spectrum.gramValues[c], 0));
    // through ΔᵀΔ a true zero comes out near √ε‖Δ‖: below the resolution the mode is the kernel, σ = 0
    sigma[c] = value > KERNEL_RESOLUTION * top ? value : 0;
  }
  // untruncated, the state is ½(B s Bᵀ + iΔ): A and ΔB (two N³ products) serve only the checks
  const deltaBasis = complete ? null : backend.multiply(delta, basis);
  const deltaInBasis = deltaBasis ? backend.multiply(basis, deltaBasis, { transposeA: true }) : null;
  return { size: n, complete, modesKept: Math.min(truncation.modesKept, spectrum.positive.length), cutoff: truncation.cutoff, basis, sigma, deltaInBasis, delta, deltaTimesBasis: deltaBasis };
}

/**
 * Re W_O of an untruncated state, ¼(B_O s B_Oᵀ + (ΔB)_O s⁺ (ΔB)_Oᵀ): the restriction of the mean of
 * two estimates of |Δ| from the same eigenvectors, B s Bᵀ and Δ (B s⁺ Bᵀ) Δᵀ (equal for exact ones,
 * since Δ|Δ|⁺Δᵀ = |Δ|; s⁺ inverts s > 0 and keeps the kernel at 0). B comes from ΔᵀΔ, so its
 * rounding is of order ε‖Δ‖², and in the normal modes of Δ (complex structure J = |Δ|⁺Δ) it enters
 * B s Bᵀ as +F and Δ(B s⁺ Bᵀ)Δᵀ as −JFJᵀ to first order, for both the rotation of the vectors and
 * the error of s (σ²/s ≈ σ − δs). The part of F that commutes with J is the one that moves the
 * symplectic eigenvalues κ of a pure state off ½ at first order, by about ε(σ_max/σ)² in a mode of σ
 * (the whole region of an untruncated state had S ≈ 5e-9 at N = 300 and 1e-5 at N = 2000); in the
 * mean it cancels, and S of the whole region comes out near 1e-11 to 1e-10, as numpy's complex route
 * finds (tests/engine/entropyFloor.test.ts). Cost: one product Bᵀ Δ_{:,O} (2 r N |O| flops) and a
 * second Gram product of r × |O|, paid only when the state is restricted.
 */
function completeRestrictedReal(state: SjState, elements: ArrayLike<number>, backend: LinearAlgebraBackend): DenseMatrix {
  const m = elements.length;
  const n = state.size;
  let r = 0;
  while (r < state.sigma.length && state.sigma[r] > 0) r++;
  // the kernel (σ = 0, trailing) adds nothing to either term
  const kept: DenseMatrix = { rows: n, cols: r, data: state.basis.data.subarray(0, n * r) };
  const direct = denseMatrix(r, m);
  for (let a = 0; a < m; a++) {
    const row = elements[a];
    for (let c = 0; c < r; c++) direct.data[a * r + c] = Math.sqrt(0.25 * state.sigma[c]) * state.basis.data[row + c * n];
  }
  let columns = state.delta;
  let identity = m === n;
  for (let a = 0; identity && a < m; a++) identity = elements[a] === a;
  if (!identity) {
    columns = denseMatrix(n, m);
    for (let a = 0; a < m; a++) columns.data.set(state.delta.data.subarray(elements[a] * n, (elements[a] + 1) * n), a * n);
  }
  // Bᵀ Δ_{:,O} = −((ΔB)_O)ᵀ; the sign drops out of the Gram product
  const mapped = backend.multiply(kept, columns, { transposeA: true });
  for (let a = 0; a < m; a++) for (let c = 0; c < r; c++) mapped.data[a * r + c] *= 1 / (2 * Math.sqrt(state.sigma[c]));
  const real = backend.gram(direct);
  const second = backend.gram(mapped);
  for (let k = 0; k < real.data.length; k++) real.data[k] += second.data[k];
  return real;
}

/**
 * Real and imaginary parts of W_c restricted to the given elements (both |O| × |O|, column-major).
 * Im W_O = ½ B_O A B_Oᵀ (truncated) or ½ Δ_O (untruncated). Re W_O is in either case the restriction of
 * the mean of two estimates of |Δ_c| from the same eigenvectors: untruncated ¼(B s Bᵀ + Δ B s⁺ Bᵀ Δᵀ)
 * (`completeRestrictedReal`), truncated its form in the kept basis, B ¼(s + A s⁺ Aᵀ) Bᵀ
 * (`truncatedRestrictedReal`); the diagnostics check the form ½ B s Bᵀ, which differs from the mean by
 * rounding.
 */
export function restrictedWightman(
  state: SjState,
  elements: ArrayLike<number>,
  backend: LinearAlgebraBackend = getBackend(),
): { real: DenseMatrix; imaginary: DenseMatrix } {
  const m = elements.length;
  const r = state.sigma.length;
  const n = state.size;
  if (state.complete) {
    const imaginary = denseMatrix(m, m);
    for (let b = 0; b < m; b++) {
      const column = elements[b] * n;
      for (let a = 0; a < m; a++) imaginary.data[a + b * m] = 0.5 * state.delta.data[elements[a] + column];
    }
    return { real: completeRestrictedReal(state, elements, backend), imaginary };
  }
  if (!state.deltaInBasis) throw new Error('a truncated SJ state needs A = BᵀΔB');
  const rows = denseMatrix(m, r);
  for (let c = 0; c < r; c++) for (let a = 0; a < m; a++) rows.data[a + c * m] = state.basis.data[elements[a] + c * n];
  const half = backend.multiply(rows, state.deltaInBasis);
  const imaginary = backend.multiply(half, rows, { transposeB: true });
  for (let k = 0; k < imaginary.data.length; k++) imaginary.data[k] *= 0.5;
  return { real: truncatedRestrictedReal(state, rows, half, backend), imaginary };
}

/**
 * Re W_O of a truncated state, B_O ¼(s + A s⁺ Aᵀ) B_Oᵀ = ¼(B_O s B_Oᵀ + (B_O A) s⁺ (B_O A)ᵀ): in the kept
 * basis s and A s⁺ Aᵀ are two estimates of |A| (equal for exact eigenvectors: then AᵀA = s², and the
 * normal A commutes with s; s⁺ inverts s > 0 and keeps the kernel at 0). The σ from ΔᵀΔ carry
 * an error of order ε‖Δ‖²/σ, while A = BᵀΔB gives each pair's σ to about ε‖Δ‖; in a pair of σ the
 * second estimate is σ_A²/s ≈ 2σ_A − s, so the mean is σ_A to first order and the κ of a pure
 * restriction stay at ½. With ½ B s Bᵀ alone they moved by about ε(σ_max/σ)² in a mode of σ: the whole
 * region of a state keeping σ down to 7e-5 σ_max (modes:490 at N = 1000) had S ≈ 1e-7, and 1e-9 with
 * σ down to 4e-4 σ_max at N = 300; numpy's complex route gives 1e-12 (tests/engine/entropyFloor.test.ts).
 * Both terms are Gram products, so Re W_O stays symmetric and positive semidefinite to the last bit.
 * Cost: B_O A is shared with Im W_O; the second Gram product adds r |O|² flops to the r |O|² + 2 r² |O|
 * + 2 r |O|² of the restriction.
 */
function truncatedRestrictedReal(state: SjState, rows: DenseMatrix, rowsTimesA: DenseMatrix, backend: LinearAlgebraBackend): DenseMatrix {
  const m = rows.rows;
  const s = state.sigma;
  // the kernel (σ = 0, trailing) adds nothing to either term
  let r = 0;
  while (r < s.length && s[r] > 0) r++;
  if (r === 0) return denseMatrix(m, m);
  // rows 0…r−1: ½√s B_Oᵀ; rows r…2r−1: ½ s^(−½) (B_O A)ᵀ, so Tᵀ T is the mean above
  const stacked = denseMatrix(2 * r, m);
  for (let c = 0; c < r; c++) {
    const direct = 0.5 * Math.sqrt(s[c]);
    const mapped = 0.5 / Math.sqrt(s[c]);
    const offset = c * m;
    for (let a = 0; a < m; a++) {
      stacked.data[a * 2 * r + c] = direct * rows.data[offset + a];
      stacked.data[a * 2 * r + r + c] = mapped * rowsTimesA.data[offset + a];
    }
  }
  return backend.gram(stacked);
}
