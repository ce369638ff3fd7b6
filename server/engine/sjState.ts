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
 * formed for the state (A and ΔB are left null when untruncated; `sjDiagnostics` forms what its checks
 * need). The checks test the form ½ B s Bᵀ, which differs from the mean by rounding (1e-11 of
 * ‖Re W‖_F at N = 2000 untruncated).
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

export interface SjDiagnostics {
  /** ‖W − W†‖_F / ‖W‖_F */
  hermiticityError: number;
  /** smallest eigenvalue of W_c (≥ 0 up to rounding); see `smallestEigenvalueMethod` */
  smallestEigenvalue: number;
  /**
   * 'exact': eigenvalues of W̃ from a symmetric solver; 'lower-bound': −½√‖s² − AᵀA‖_F, a rigorous bound;
   * 'probe-bound': the untruncated bound −½√‖|Δ|_c² − ΔᵀΔ‖_F with the norm estimated by random probes
   */
  smallestEigenvalueMethod: 'exact' | 'lower-bound' | 'probe-bound';
  /**
   * 'exact': every norm below from exact products; 'probe': (untruncated, N above the exact limit)
   * orthogonalityError, basisOrthonormalityError and the positivity bound are Hutchinson estimates from
   * `probeCount` seeded random sign vectors (the others stay exact)
   */
  checkMethod: 'exact' | 'probe';
  /** random probe vectors behind the estimates; 0 when checkMethod is 'exact' */
  probeCount: number;
  /**
   * ‖W − W̄ − iΔ_c‖_F with iΔ_c = iΔP (P commutes with Δ), relative to ‖Δ‖_F. Untruncated, P = I and
   * Im W is ½Δ itself, so this is 0 to rounding; how far the computed B is from B Bᵀ = I is
   * `basisOrthonormalityError`.
   */
  commutatorError: number;
  /** ‖W W̄‖_F relative to ‖W‖_F² */
  orthogonalityError: number;
  /** tr W_c */
  trace: number;
  /** sum of the kept positive eigenvalues of iΔ above the kernel resolution, what tr W_c must equal */
  positiveEigenvalueSum: number;
  /** ‖BᵀB − I‖_F: how orthonormal the kept eigenvectors are */
  basisOrthonormalityError: number;
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
    const value = Math.sqrt(Math.max(spectrum.gramValues[c], 0));
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

function frobenius(data: Float64Array): number {
  let s = 0;
  for (let k = 0; k < data.length; k++) s += data[k] * data[k];
  return Math.sqrt(s);
}

/** Largest 2r for which the smallest eigenvalue of W̃ is computed exactly (a 2r × 2r symmetric solve). */
export const EXACT_POSITIVITY_LIMIT = 800;

/**
 * Largest N for which the checks of an untruncated state use exact N³ products (about 6N³ flops,
 * as much as the eigendecomposition itself); above it they are estimated with random probes.
 */
export const EXACT_COMPLETE_CHECKS_LIMIT = 1000;

/** Probe vectors of the estimated checks: relative spread of a squared norm at most √(2/32) = 25 %. */
export const CHECK_PROBES = 32;

export interface SjDiagnosticsOptions {
  /** largest 2r for the exact smallest eigenvalue (default EXACT_POSITIVITY_LIMIT); beyond it the bound */
  exactPositivityLimit?: number;
  /** largest N of an untruncated state checked exactly (default EXACT_COMPLETE_CHECKS_LIMIT) */
  exactCompleteLimit?: number;
  /** probe vectors for the estimated checks (default CHECK_PROBES) */
  probes?: number;
}

/** Antisymmetry defect ‖M + Mᵀ‖_F² of a square matrix, in tiles so that both reads stay in cache. */
function antisymmetryDefectSquared(m: DenseMatrix): number {
  const n = m.rows;
  const tile = 64;
  let sum = 0;
  for (let jb = 0; jb < n; jb += tile) {
    const jEnd = Math.min(jb + tile, n);
    for (let ib = 0; ib <= jb; ib += tile) {
      const iEnd = Math.min(ib + tile, n);
      for (let j = jb; j < jEnd; j++) {
        const top = ib === jb ? j + 1 : iEnd;
        for (let i = ib; i < top; i++) {
          const d = m.data[i + j * n] + m.data[j + i * n];
          sum += i === j ? d * d : 2 * d * d;
        }
      }
    }
  }
  return sum;
}

/** ‖W − W†‖_F / ‖W‖_F of an untruncated W = ½(B s Bᵀ + iΔ): Re W is symmetric by construction, so W − W† = i·½(Δ + Δᵀ). */
function completeHermiticityError(delta: DenseMatrix, normW: number): number {
  return normW > 0 ? (0.5 * Math.sqrt(antisymmetryDefectSquared(delta))) / normW : 0;
}

/** n × count matrix of ±1 from a fixed-seed xorshift generator: the same probes on every run. */
export function signProbes(n: number, count: number): DenseMatrix {
  const z = denseMatrix(n, count);
  let state = 0x7ace7 >>> 0;
  for (let k = 0; k < z.data.length; k++) {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    z.data[k] = state & 1 ? 1 : -1;
  }
  return z;
}

/** The left and right `cols` columns of an n × 2·cols matrix. */
function columnHalves(m: DenseMatrix, n: number, cols: number): [DenseMatrix, DenseMatrix] {
  return [
    { rows: n, cols, data: m.data.subarray(0, n * cols) },
    { rows: n, cols, data: m.data.subarray(n * cols, 2 * n * cols) },
  ];
}

function scaleRows(m: DenseMatrix, factors: Float64Array): DenseMatrix {
  const out = denseMatrix(m.rows, m.cols);
  for (let c = 0; c < m.cols; c++) for (let i = 0; i < m.rows; i++) out.data[i + c * m.rows] = factors[i] * m.data[i + c * m.rows];
  return out;
}

/**
 * The checks of an untruncated state estimated by Hutchinson's trace estimator (Hutchinson 1989,
 * Commun. Stat. Simul. Comput. 18 1059; Avron–Toledo 2011, J. ACM 58 8): ‖M‖_F² = tr MᵀM = E‖Mz‖² for
 * z of independent random signs, averaged over p probes (relative spread of the squared norm ≤ √(2/p)).
 * With P = B s Bᵀ = Re 2W (positive semidefinite for any B, since s ≥ 0):
 *   4 W W̄ = (P + iΔ)(P − iΔ) = (P² + Δ²) + i(ΔP − PΔ),
 * and W = ½(|Δ| + iΔ) + ½(P − |Δ|) with the first term positive semidefinite, so
 *   λ_min(W) ≥ −½‖P − |Δ|‖₂ ≥ −½√‖P² − ΔᵀΔ‖₂ ≥ −½√‖P² + Δ²‖_F   (ΔᵀΔ = −Δ²).
 * Cost: six products of N × N by N × p or N × 2p (10pN² multiply–adds) instead of six N³ products.
 */
function probedCompleteChecks(
  state: SjState,
  backend: LinearAlgebraBackend,
  probes: number,
): { orthogonalityDefect: number; positivityDefect: number; basisOrthonormalityError: number } {
  const n = state.size;
  const basis = state.basis;
  const z = signProbes(n, probes);
  const half = n * probes;
  const sideBySide = (left: DenseMatrix, right: DenseMatrix) => {
    const out = denseMatrix(n, left.cols + right.cols);
    out.data.set(left.data, 0);
    out.data.set(right.data, left.data.length);
    return out;
  };
  // B square: ‖BᵀB − I‖_F = ‖BBᵀ − I‖_F (the two Gram matrices share their eigenvalues), so the
  // product BᵀZ serves both PZ = B s BᵀZ and (BBᵀ − I)Z
  const bz = backend.multiply(basis, z, { transposeA: true });
  const [pz, bbz] = columnHalves(backend.multiply(basis, sideBySide(scaleRows(bz, state.sigma), bz)), n, probes);
  const dz = backend.multiply(state.delta, z);
  const both = sideBySide(pz, dz); // [PZ, ΔZ]: P and Δ are each applied once more to both
  const pBoth = backend.multiply(basis, scaleRows(backend.multiply(basis, both, { transposeA: true }), state.sigma)); // [P²Z, PΔZ]
  const dBoth = backend.multiply(state.delta, both); // [ΔPZ, Δ²Z]
  let realPart = 0;
  let imaginaryPart = 0;
  let orthonormality = 0;
  for (let k = 0; k < half; k++) {
    const re = pBoth.data[k] + dBoth.data[half + k];
    const im = dBoth.data[k] - pBoth.data[half + k];
    realPart += re * re;
    imaginaryPart += im * im;
    orthonormality += (bbz.data[k] - z.data[k]) ** 2;
  }
  return {
    orthogonalityDefect: Math.sqrt((realPart + imaginaryPart) / probes),
    positivityDefect: Math.sqrt(realPart / probes),
    basisOrthonormalityError: Math.sqrt(orthonormality / probes),
  };
}

/**
 * Checks of server/engine/README.md §5 on a state: W Hermitian and positive semidefinite, W − W̄ = iΔ_c,
 * W W̄ = 0, tr W = sum of the positive eigenvalues.
 *
 * Cost. Everything of the form B M Bᵀ is measured through M in the kept basis, since ‖B M Bᵀ‖_F = ‖M‖_F
 * for orthonormal columns, up to ‖BᵀB − I‖_F, which is reported itself (`basisOrthonormalityError`,
 * from the one Gram product H = BᵀB that also gives tr W_c and, untruncated, ‖B s Bᵀ‖_F exactly).
 * Truncated (r ≪ N): O(N r²). Untruncated up to EXACT_COMPLETE_CHECKS_LIMIT: ΔB and A = Bᵀ(ΔB) for
 * the positivity and W W̄ checks, plus the two Gram products H and AᵀA (dsyrk on native); the
 * Hermiticity, ‖W‖ and commutator checks use Δ itself, as the state does. Untruncated above the limit
 * those six N³ products would cost as much as the eigendecomposition, so the norms that need them are
 * estimated with random probes instead (`probedDiagnostics`; checkMethod says which).
 *
 * Positivity. The smallest eigenvalue of the Hermitian W̃ = X + iY is that of the real symmetric
 * [[X, −Y], [Y, X]] (each eigenvalue twice); beyond the exact limit it is bounded from below instead:
 * W̃ = ½(|A| + iA) + ½(s − |A|) with the first term positive semidefinite, and
 * ‖s − |A|‖₂ ≤ √‖s² − AᵀA‖₂ for positive semidefinite square roots.
 */
export function sjDiagnostics(
  state: SjState,
  positive: Float64Array,
  backend: LinearAlgebraBackend = getBackend(),
  options: SjDiagnosticsOptions = {},
): SjDiagnostics {
  const r = state.sigma.length;
  const n = state.size;
  const s = state.sigma;
  const exactPositivityLimit = options.exactPositivityLimit ?? EXACT_POSITIVITY_LIMIT;
  const probes = options.probes ?? CHECK_PROBES;
  if (!(Number.isInteger(probes) && probes >= 1)) throw new RangeError(`probes must be a positive integer, got ${probes}`);
  if (state.complete && n > (options.exactCompleteLimit ?? EXACT_COMPLETE_CHECKS_LIMIT)) {
    return probedDiagnostics(state, positive, backend, probes);
  }

  // H = BᵀB: orthonormality, the column norms for tr W_c, and the exact ‖B s Bᵀ‖_F² = Σ s_i s_j H_ij²
  const gram = backend.gram(state.basis);
  let trace = 0;
  for (let c = 0; c < r; c++) trace += 0.5 * s[c] * gram.data[c + c * r];

  // the state's products are reused when truncated; untruncated they exist only for these checks
  const deltaB = state.deltaTimesBasis ?? backend.multiply(state.delta, state.basis);
  const a = state.deltaInBasis ?? backend.multiply(state.basis, deltaB, { transposeA: true });

  let hermiticityError: number;
  let commutatorError: number;
  let normW: number;
  const normDelta = frobenius(state.delta.data);
  if (state.complete) {
    let realNorm2 = 0;
    for (let j = 0; j < r; j++) {
      for (let i = 0; i < r; i++) realNorm2 += s[i] * s[j] * gram.data[i + j * r] ** 2;
    }
    normW = 0.5 * Math.sqrt(realNorm2 + normDelta ** 2);
    hermiticityError = completeHermiticityError(state.delta, normW);
    // every mode kept: P = I, and W − W̄ = 2i·Im W = iΔ = iΔ_c entry by entry (Im W is ½Δ, and the
    // factors ½ and 2 are exact in binary), so the defect is exactly zero; what the computed B lacks
    // of B Bᵀ = I is basisOrthonormalityError
    commutatorError = 0;
  } else {
    let antisymmetryDefect = 0;
    for (let j = 0; j < r; j++) for (let i = 0; i < r; i++) antisymmetryDefect += (a.data[i + j * r] + a.data[j + i * r]) ** 2;
    normW = 0.5 * Math.sqrt(frobenius(s) ** 2 + frobenius(a.data) ** 2);
    hermiticityError = normW > 0 ? (0.5 * Math.sqrt(antisymmetryDefect)) / normW : 0;
    // W − W̄ − iΔP = i(BA − ΔB)Bᵀ, whose norm is ‖BA − ΔB‖_F for orthonormal B
    const bA = backend.multiply(state.basis, a);
    let leak = 0;
    for (let k = 0; k < deltaB.data.length; k++) leak += (bA.data[k] - deltaB.data[k]) ** 2;
    commutatorError = Math.sqrt(leak) / Math.max(normDelta, Number.MIN_VALUE);
  }

  // 4 W̃ conj(W̃) = (s + iA)(s − iA) = s² + A² + i(As − sA)
  // A·A = −AᵀA for antisymmetric A (its symmetric part is the hermiticity error above); the Gram
  // product is a symmetric rank-k update (dsyrk on native), half the work of a general product
  const aa = backend.gram(a);
  for (let k = 0; k < aa.data.length; k++) aa.data[k] = -aa.data[k];
  let product = 0;
  for (let j = 0; j < r; j++) {
    for (let i = 0; i < r; i++) {
      const re = aa.data[i + j * r] + (i === j ? s[i] * s[i] : 0);
      const im = a.data[i + j * r] * (s[j] - s[i]);
      product += re * re + im * im;
    }
  }
  const orthogonalityError = normW > 0 ? (0.25 * Math.sqrt(product)) / normW ** 2 : 0;

  let smallestEigenvalue: number;
  let smallestEigenvalueMethod: SjDiagnostics['smallestEigenvalueMethod'];
  if (2 * r <= exactPositivityLimit) {
    const m = 2 * r;
    const embedding = denseMatrix(m, m);
    for (let j = 0; j < r; j++) {
      for (let i = 0; i < r; i++) {
        const y = 0.25 * (a.data[i + j * r] - a.data[j + i * r]);
        const x = i === j ? 0.5 * s[i] : 0;
        embedding.data[i + j * m] = x;
        embedding.data[i + r + (j + r) * m] = x;
        embedding.data[i + r + j * m] = y;
        embedding.data[i + (j + r) * m] = -y;
      }
    }
    const values = backend.symmetricEigen(embedding, { vectors: false }).values;
    smallestEigenvalue = r < n ? Math.min(values[0], 0) : values[0];
    smallestEigenvalueMethod = 'exact';
  } else {
    // AᵀA = −A·A for antisymmetric A
    let defect = 0;
    for (let j = 0; j < r; j++) {
      for (let i = 0; i < r; i++) {
        const d = (i === j ? s[i] * s[i] : 0) + aa.data[i + j * r];
        defect += d * d;
      }
    }
    smallestEigenvalue = -0.5 * Math.sqrt(Math.sqrt(defect));
    smallestEigenvalueMethod = 'lower-bound';
  }

  for (let c = 0; c < r; c++) gram.data[c + c * r] -= 1;
  const basisOrthonormalityError = frobenius(gram.data);

  return {
    hermiticityError,
    smallestEigenvalue,
    smallestEigenvalueMethod,
    commutatorError,
    orthogonalityError,
    trace,
    positiveEigenvalueSum: keptEigenvalueSum(state, positive),
    basisOrthonormalityError,
    checkMethod: 'exact',
    probeCount: 0,
  };
}

/** Sum of the kept positive eigenvalues above the kernel resolution: what tr W_c must equal. */
function keptEigenvalueSum(state: SjState, positive: Float64Array): number {
  let sum = 0;
  for (let k = 0; k < state.modesKept; k++) if (positive[k] > KERNEL_RESOLUTION * positive[0]) sum += positive[k];
  return sum;
}

/**
 * The checks of an untruncated state of large N: the Hermiticity defect, tr W and the norms of Δ
 * exactly (O(N²)), the rest from random probes (`probedCompleteChecks`). ‖W‖_F uses ‖B s Bᵀ‖_F = ‖s‖,
 * exact for orthonormal B; the departure from that is basisOrthonormalityError itself.
 */
function probedDiagnostics(state: SjState, positive: Float64Array, backend: LinearAlgebraBackend, probes: number): SjDiagnostics {
  const n = state.size;
  const s = state.sigma;
  let trace = 0;
  for (let c = 0; c < n; c++) {
    let norm2 = 0;
    for (let i = 0; i < n; i++) norm2 += state.basis.data[i + c * n] ** 2;
    trace += 0.5 * s[c] * norm2;
  }
  const normDelta = frobenius(state.delta.data);
  const normW = 0.5 * Math.sqrt(frobenius(s) ** 2 + normDelta ** 2);
  const hermiticityError = completeHermiticityError(state.delta, normW);
  const probed = probedCompleteChecks(state, backend, probes);
  return {
    hermiticityError,
    smallestEigenvalue: -0.5 * Math.sqrt(probed.positivityDefect),
    smallestEigenvalueMethod: 'probe-bound',
    commutatorError: 0,
    orthogonalityError: normW > 0 ? (0.25 * probed.orthogonalityDefect) / normW ** 2 : 0,
    trace,
    positiveEigenvalueSum: keptEigenvalueSum(state, positive),
    basisOrthonormalityError: probed.basisOrthonormalityError,
    checkMethod: 'probe',
    probeCount: probes,
  };
}
