import type { DenseMatrix, LinearAlgebraBackend } from './linalg/backend';
import { denseMatrix, getBackend } from './linalg';
import { KERNEL_RESOLUTION, type SjState } from './sjState';

/**
 * The checks of server/engine/README.md §5 on an SJ state: `sjDiagnostics` below computes them for the
 * dense state, `factoredDiagnostics` (structured/factoredState.ts) in the same form for the factored one.
 */
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
