import type { RestrictedCut, SubregionSpec } from '@shared/vacuum';
import type { DenseMatrix, LinearAlgebraBackend } from './linalg/backend';
import { denseMatrix, getBackend } from './linalg';
import { pairedSingularValues } from './pauliJordan';
import { separationX } from './regions';
import { restrictedWightman, type SjState } from './sjState';
import { restrictedCutoff } from './truncation';

export interface EntropyResult {
  S: number;
  /** elements in the subregion */
  n: number;
  /** eigenmodes of the restricted iΔ_O kept (both signs; twice the number of pairs) */
  modesKept: number;
  /** |λ| of iΔ_O below which modes were dropped */
  cutoff: number;
  doubleTruncation: boolean;
  /** the second cut of double truncation that was applied; null without double truncation */
  restrictedCut: RestrictedCut | null;
  /** the generalized eigenvalues μ of W_O v = μ iΔ_O v, in pairs μ, 1 − μ, descending */
  generalizedEigenvalues: Float64Array;
}

/**
 * Without truncation only the numerical kernel of iΔ_O is dropped: true zeros sit near 1e-8 of the
 * largest |λ| through ΔᵀΔ while the smallest genuine modes are about 5e-4 of it (server/engine/README.md §6).
 */
export const KERNEL_RELATIVE_THRESHOLD = 1e-6;

/** Element labels inside a subregion: a diamond p ≺ e ≺ q in the causal order of the whole set, or a list. */
export function subregionElements(
  spec: SubregionSpec,
  points: ArrayLike<number>,
  dimension: 2 | 4,
  periodX?: number,
): Int32Array {
  const size = points.length / dimension;
  if (spec.kind === 'elements') {
    const unique = Array.from(new Set(spec.indices)).sort((a, b) => a - b);
    const bad = unique.find((i) => i >= size);
    if (bad !== undefined) throw new RangeError(`subregion element ${bad} does not exist (the causal set has ${size} elements)`);
    return Int32Array.from(unique);
  }
  const tipDimension = 'y' in spec.past ? 4 : 2;
  if (tipDimension !== dimension || ('y' in spec.future ? 4 : 2) !== dimension) {
    throw new RangeError(`subregion tips must have ${dimension === 2 ? 't,x' : 't,x,y,z'} coordinates for these points`);
  }
  const tip = (e: Extract<SubregionSpec, { kind: 'diamond' }>['past']) =>
    'y' in e ? [e.t, e.x, e.y, e.z] : [e.t, e.x];
  const p = tip(spec.past);
  const q = tip(spec.future);
  const inFuture = (a: number[], b: ArrayLike<number>, offset: number) => {
    const dt = b[offset] - a[0];
    if (dt <= 0) return false;
    if (dimension === 2) return dt > separationX(b[offset + 1] - a[1], periodX);
    const dx = b[offset + 1] - a[1];
    const dy = b[offset + 2] - a[2];
    const dz = b[offset + 3] - a[3];
    return dt * dt > dx * dx + dy * dy + dz * dz;
  };
  const inside: number[] = [];
  const qAsArray = Float64Array.from(q);
  for (let i = 0; i < size; i++) {
    const e = Array.from({ length: dimension }, (_, k) => points[i * dimension + k]);
    if (inFuture(p, points, i * dimension) && inFuture(e, qAsArray, 0)) inside.push(i);
  }
  return Int32Array.from(inside);
}

function symmetrise(m: DenseMatrix): void {
  const n = m.rows;
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < j; i++) {
      const v = 0.5 * (m.data[i + j * n] + m.data[j + i * n]);
      m.data[i + j * n] = v;
      m.data[j + i * n] = v;
    }
  }
}

/** V f(Λ) Vᵀ from the eigendecomposition X = V Λ Vᵀ of a symmetric X. */
function symmetricFunction(
  eig: { values: Float64Array; vectors: DenseMatrix | null },
  f: (value: number) => number,
  backend: LinearAlgebraBackend,
): DenseMatrix {
  const v = eig.vectors as DenseMatrix;
  const m = v.rows;
  const scaled = denseMatrix(m, m);
  for (let c = 0; c < m; c++) {
    const factor = f(eig.values[c]);
    for (let i = 0; i < m; i++) scaled.data[i + c * m] = v.data[i + c * m] * factor;
  }
  return backend.multiply(scaled, v, { transposeB: true });
}

function transposed(m: DenseMatrix): DenseMatrix {
  const t = denseMatrix(m.cols, m.rows);
  for (let j = 0; j < m.cols; j++) for (let i = 0; i < m.rows; i++) t.data[j + i * m.cols] = m.data[i + j * m.rows];
  return t;
}

/**
 * A matrix whose singular values give the κ: the singular values of B = X̃^½ Ã⁻¹ X̃^½ are the κ, those
 * of its inverse C = X̃^(−½) Ã X̃^(−½) are the 1/κ. With the Cholesky factor X̃ = L Lᵀ, L = X̃^½ Q for an
 * orthogonal Q, so L⁻¹ Ã L⁻ᵀ = Qᵀ C Q has the singular values of C: two triangular substitutions, with
 * no inverse of Ã at all. That is the point: Ã⁻¹ = diag(σ⁻²) Ãᵀ rests on the σ² of AᵀA, whose absolute
 * error ε‖A‖² is a relative error ε(σ_max/σ)² on the small σ — 1e-8 for a spread of 1e4, which set κ of
 * a pure state 1e-8 off ½ and, through (½+δ) ln(½+δ) − δ ln δ ≈ δ(1 − ln δ), its S near 1e-6. The 1/κ
 * of a state with W_O ≥ 0 lie in (0, 2]; through CᵀC the large ones, κ near ½ where S is most
 * sensitive, come out to about ε, and a large κ to a relative 2εκ² (S moves by about that, since
 * d/dκ of the term is 1/κ there).
 * X̃ is positive definite when W_O ≥ 0 (X̃v = 0 would force Ãv = 0); when rounding makes the
 * factorisation fail, the square root serves, and for a state off its checks, with an eigenvalue of X̃
 * at or below zero, B = X̃^½ Ã⁻¹ X̃^½ with the square root clamped at zero (κ = 0 in those directions).
 */
function whitenedMatrix(
  xTilde: DenseMatrix,
  aTilde: DenseMatrix,
  aTildeInverse: () => DenseMatrix,
  backend: LinearAlgebraBackend,
): { matrix: DenseMatrix; singularValues: 'kappa' | 'inverseKappa' } {
  const lower = backend.cholesky(xTilde);
  if (lower) {
    // C = (L⁻¹ Ã) L⁻ᵀ, so Cᵀ = L⁻¹ (L⁻¹ Ã)ᵀ; Cᵀ has the singular values of C
    const left = backend.solveTriangular(lower, aTilde, { lower: true });
    return { matrix: backend.solveTriangular(lower, transposed(left), { lower: true }), singularValues: 'inverseKappa' };
  }
  const eig = backend.symmetricEigen(xTilde);
  if (eig.values[0] > 0) {
    const inverseRoot = symmetricFunction(eig, (v) => 1 / Math.sqrt(v), backend);
    return { matrix: backend.multiply(inverseRoot, backend.multiply(aTilde, inverseRoot)), singularValues: 'inverseKappa' };
  }
  const root = symmetricFunction(eig, (v) => Math.sqrt(Math.max(v, 0)), backend);
  return { matrix: backend.multiply(root, backend.multiply(aTildeInverse(), root)), singularValues: 'kappa' };
}

/** (κ + ½) ln(κ + ½) − (κ − ½) ln(κ − ½), with 0 ln 0 = 0 and κ < ½ (rounding) clamped to ½. */
function bosonicTerm(kappa: number): number {
  const k = Math.max(kappa, 0.5);
  const plus = k + 0.5;
  const minus = k - 0.5;
  return plus * Math.log(plus) - (minus > 0 ? minus * Math.log(minus) : 0);
}

/**
 * The inner SSEE routine, the real-arithmetic route of server/engine/README.md §11 (Sorkin 2012,
 * arXiv:1205.2953; Saravani–Sorkin–Yazdi 2014, CQG 31 214006; double truncation Sorkin–Yazdi 2018,
 * CQG 35 074004). X = Re W_c|_O (symmetric) and A = Δ_c|_O (antisymmetric) may be given in any
 * orthonormal basis of a subspace holding their joint range (the n × n restriction itself, or the
 * 2k × 2k reduction of the factored state): S and the nonzero spectrum of A do not change.
 * The cut: with `doubleTruncation` the modes of AᵀA with σ at or below the restricted cut are dropped
 * (√n/(4π) by default, n = elements of O whatever the basis size, or a fixed λ), otherwise only the numerical kernel (σ ≤ KERNEL_RELATIVE_THRESHOLD σ_max).
 * U = kept eigenvectors of AᵀA (then A U σ⁻¹, one step of subspace iteration), Ã = UᵀAU, X̃ = UᵀXU,
 * B = X̃^½ Ã⁻¹ X̃^½; the eigenvalues κ² of BᵀB (each
 * twice) give S = ½ Σ_i [(κ_i+½) ln(κ_i+½) − (κ_i−½) ln(κ_i−½)] and μ = ½ ± κ. The κ are taken as the
 * reciprocal singular values of B⁻¹ = X̃^(−½) Ã X̃^(−½), in its orthogonal equivalent L⁻¹ Ã L⁻ᵀ with
 * X̃ = L Lᵀ, which needs no Ã⁻¹ (see `whitenedMatrix` for why that keeps κ = ½ to rounding).
 * X is symmetrised in place.
 */
export function restrictedEntropy(
  x: DenseMatrix,
  a: DenseMatrix,
  cut: { n: number; doubleTruncation: boolean; restrictedCut?: RestrictedCut | null },
  backend: LinearAlgebraBackend,
): EntropyResult {
  const { n, doubleTruncation } = cut;
  const restrictedCut = doubleTruncation ? (cut.restrictedCut ?? { rule: 'sqrtN' as const }) : null;
  const m = a.rows;
  symmetrise(x);
  const eig = backend.symmetricEigen(backend.gram(a));
  const sigmas = pairedSingularValues(eig.values);
  const cutoff = restrictedCut ? restrictedCutoff(n, restrictedCut) : KERNEL_RELATIVE_THRESHOLD * (sigmas[0] ?? 0);
  let pairs = 0;
  while (pairs < sigmas.length && sigmas[pairs] > cutoff) pairs++;
  const kept = 2 * pairs;
  if (kept === 0) return { S: 0, n, modesKept: 0, cutoff, doubleTruncation, restrictedCut, generalizedEigenvalues: new Float64Array(0) };
  const u = denseMatrix(m, kept);
  const gramKept = new Float64Array(kept);
  const vectors = (eig.vectors as DenseMatrix).data;
  for (let c = 0; c < kept; c++) {
    const source = m - 1 - c;
    u.data.set(vectors.subarray(source * m, (source + 1) * m), c * m);
    gramKept[c] = eig.values[source];
  }
  // U leans into the dropped modes by about ε‖A‖²/(σ² − σ_dropped²), which X̃ feels at first order
  // (S 1e-8 off, relative, with kept σ down to 2e-5 σ_max over a numerical kernel); one step of subspace
  // iteration, A U σ⁻¹, shrinks the lean by σ_dropped/σ, for a numerical kernel to rounding (a dropped σ
  // close to a kept one far below σ_max keeps most of it). The basis stays orthonormal to about
  // ε(σ_max/σ)², which does not matter: the κ depend only on the subspace (X̃ and Ã change by the same
  // congruence).
  const basis = backend.multiply(a, u);
  for (let c = 0; c < kept; c++) {
    const scale = 1 / Math.sqrt(gramKept[c]);
    for (let i = 0; i < m; i++) basis.data[i + c * m] *= scale;
  }
  const aTilde = backend.multiply(basis, backend.multiply(a, basis), { transposeA: true });
  const xTilde = backend.multiply(basis, backend.multiply(x, basis), { transposeA: true });
  symmetrise(xTilde);
  const aTildeInverse = () => {
    const inverse = denseMatrix(kept, kept);
    for (let j = 0; j < kept; j++) for (let i = 0; i < kept; i++) inverse.data[i + j * kept] = aTilde.data[j + i * kept] / gramKept[i];
    return inverse;
  };
  const whitened = whitenedMatrix(xTilde, aTilde, aTildeInverse, backend);
  const squares = backend.symmetricEigen(backend.gram(whitened.matrix), { vectors: false }).values;
  let kappaSquared = squares;
  if (whitened.singularValues === 'inverseKappa') {
    // ascending 1/κ² give descending κ²; a 1/κ² under the resolution ε‖C‖² of CᵀC is held at it
    // (κ ≳ 1e8 / ‖C‖, which no state with W_O ≥ 0 and σ above the cut reaches) so that S stays finite
    const resolution = Number.EPSILON * squares[squares.length - 1];
    kappaSquared = Float64Array.from(squares, (_, i) => 1 / Math.max(squares[squares.length - 1 - i], resolution));
  }
  let sum = 0;
  for (let i = 0; i < kappaSquared.length; i++) sum += bosonicTerm(Math.sqrt(Math.max(kappaSquared[i], 0)));
  const mu: number[] = [];
  for (const kappa of pairedSingularValues(kappaSquared)) mu.push(0.5 + kappa, 0.5 - kappa);
  mu.sort((p, q) => q - p);
  return { S: 0.5 * sum, n, modesKept: kept, cutoff, doubleTruncation, restrictedCut, generalizedEigenvalues: Float64Array.from(mu) };
}

/**
 * Sorkin's spacetime entanglement entropy of a subregion O (Sorkin 2012, arXiv:1205.2953;
 * Saravani–Sorkin–Yazdi 2014, CQG 31 214006): S = Σ μ ln|μ| over W_O v = μ iΔ_O v outside the kernel of
 * iΔ_O. Double truncation (Sorkin–Yazdi 2018): restrict the truncated W_c, iΔ_c and drop the modes of the
 * restricted iΔ_c with |λ| at or below the restricted cut (√n/(4π) unless another is given); otherwise only the numerical kernel is dropped. Restricts the
 * dense state to O (A = Δ_c|_O = 2 Im W_c|_O, X = Re W_c|_O) and hands both to restrictedEntropy.
 */
export function entanglementEntropy(
  state: SjState,
  elements: ArrayLike<number>,
  options: { doubleTruncation?: boolean; restrictedCut?: RestrictedCut | null; backend?: LinearAlgebraBackend } = {},
): EntropyResult {
  const backend = options.backend ?? getBackend();
  const n = elements.length;
  const doubleTruncation = options.doubleTruncation === true;
  if (n < 2) throw new RangeError(`the subregion holds ${n} element(s); the entropy needs at least 2`);
  const { real, imaginary } = restrictedWightman(state, elements, backend);
  const a = denseMatrix(n, n);
  for (let k = 0; k < a.data.length; k++) a.data[k] = 2 * imaginary.data[k];
  return restrictedEntropy(real, a, { n, doubleTruncation, restrictedCut: options.restrictedCut }, backend);
}
