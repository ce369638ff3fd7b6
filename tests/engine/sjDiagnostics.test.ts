/**
 * The SJ-state checks as sjDiagnostics computes them (in the kept basis, reusing the state's products)
 * against the same checks computed directly from their definitions (server/engine/README.md §5: W Hermitian and
 * positive semidefinite, W − W̄ = iΔ_c with iΔ_c = iΔP, W W̄ = 0, tr W), on N × N matrices formed
 * explicitly, for the untruncated and the √N/(4π)-truncated state, on both linear-algebra backends;
 * and the probe estimates that replace the untruncated N³ checks at large N against the exact ones.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { retardedGreen } from '../../server/engine/green';
import type { DenseMatrix, LinearAlgebraBackend } from '../../server/engine/linalg/backend';
import { denseMatrix } from '../../server/engine/linalg';
import { mlMatrixBackend } from '../../server/engine/linalg/mlMatrixBackend';
import { nativeBackendStatus } from '../../server/engine/linalg/nativeBackend';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum, type PauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sjDiagnostics, type SjDiagnostics } from '../../server/engine/sjDiagnostics';
import { sjState, type SjState } from '../../server/engine/sjState';
import { sprinkle } from '../../server/engine/sprinkle';
import { applyTruncation } from '../../server/engine/truncation';

const N = 200;
const native = nativeBackendStatus().backend;
const backends: LinearAlgebraBackend[] = native ? [native, mlMatrixBackend] : [mlMatrixBackend];

function frobenius(data: Float64Array): number {
  let s = 0;
  for (const v of data) s += v * v;
  return Math.sqrt(s);
}

function combine(a: DenseMatrix, b: DenseMatrix, alpha: number, beta: number): DenseMatrix {
  const out = denseMatrix(a.rows, a.cols);
  for (let k = 0; k < out.data.length; k++) out.data[k] = alpha * a.data[k] + beta * b.data[k];
  return out;
}

function transpose(a: DenseMatrix): DenseMatrix {
  const out = denseMatrix(a.cols, a.rows);
  for (let j = 0; j < a.cols; j++) for (let i = 0; i < a.rows; i++) out.data[j + i * a.cols] = a.data[i + j * a.rows];
  return out;
}

/** The §4 checks from W = ½(X + iY) formed as N × N matrices, with general products only. */
function directDiagnostics(state: SjState, backend: LinearAlgebraBackend) {
  const n = state.size;
  const r = state.sigma.length;
  const b = state.basis;
  const scaled = denseMatrix(n, r);
  for (let c = 0; c < r; c++) for (let i = 0; i < n; i++) scaled.data[i + c * n] = state.sigma[c] * b.data[i + c * n];
  const x = backend.multiply(scaled, b, { transposeB: true });
  // untruncated the state's imaginary part is Δ itself; truncated it is B A Bᵀ with A = BᵀΔB
  const a = backend.multiply(b, backend.multiply(state.delta, b), { transposeA: true });
  const y = state.complete ? state.delta : backend.multiply(backend.multiply(b, a), b, { transposeB: true });

  const normW = 0.5 * Math.hypot(frobenius(x.data), frobenius(y.data));
  // W − W† = ½[(X − Xᵀ) + i(Y + Yᵀ)]
  const hermiticityError = (0.5 * Math.hypot(frobenius(combine(x, transpose(x), 1, -1).data), frobenius(combine(y, transpose(y), 1, 1).data))) / normW;

  // W − W̄ − iΔP = i(Y − Δ B Bᵀ)
  const deltaP = backend.multiply(backend.multiply(state.delta, b), b, { transposeB: true });
  const commutatorError = frobenius(combine(y, deltaP, 1, -1).data) / frobenius(state.delta.data);

  // 4 W W̄ = (X + iY)(X − iY) = X² + Y² + i(YX − XY)
  const xx = backend.multiply(x, x);
  const yy = backend.multiply(y, y);
  const yx = backend.multiply(y, x);
  const xy = backend.multiply(x, y);
  const orthogonalityError =
    (0.25 * Math.hypot(frobenius(combine(xx, yy, 1, 1).data), frobenius(combine(yx, xy, 1, -1).data))) / normW ** 2;

  // eigenvalues of the Hermitian W = ½(X + iY) are those of the real symmetric ½[[X, −Y], [Y, X]]
  const m = 2 * n;
  const embedding = denseMatrix(m, m);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const xs = 0.25 * (x.data[i + j * n] + x.data[j + i * n]);
      const ys = 0.25 * (y.data[i + j * n] - y.data[j + i * n]);
      embedding.data[i + j * m] = xs;
      embedding.data[i + n + (j + n) * m] = xs;
      embedding.data[i + n + j * m] = ys;
      embedding.data[i + (j + n) * m] = -ys;
    }
  }
  const smallestEigenvalue = backend.symmetricEigen(embedding, { vectors: false }).values[0];

  let trace = 0;
  for (let i = 0; i < n; i++) trace += 0.5 * x.data[i + i * n];

  const bb = backend.multiply(b, b, { transposeA: true });
  for (let c = 0; c < r; c++) bb.data[c + c * r] -= 1;
  return { hermiticityError, commutatorError, orthogonalityError, smallestEigenvalue, trace, basisOrthonormalityError: frobenius(bb.data) };
}

describe.each(backends.map((b) => [b.name, b] as const))('SJ checks in the kept basis equal the direct checks (%s)', (_name, backend) => {
  let delta: DenseMatrix;
  let spectrum: PauliJordanSpectrum;
  beforeAll(() => {
    const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: N, seed: 'sj-checks-200', prng: 'arc4' });
    delta = pauliJordan(retardedGreen({ points: s.points, dimension: 2, causal: causalMatrix(s.points, 2), backend }));
    spectrum = pauliJordanSpectrum(delta, { backend });
  });

  it.each([['none'], ['sqrtN']] as const)('with truncation rule %s, to 1e-12', (rule) => {
    const state = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule }), backend);
    expect(state.complete).toBe(rule === 'none');
    const cheap: SjDiagnostics = sjDiagnostics(state, spectrum.positive, backend);
    const direct = directDiagnostics(state, backend);
    const lambdaMax = spectrum.positive[0];
    expect(cheap.smallestEigenvalueMethod).toBe('exact');
    expect(Math.abs(cheap.hermiticityError - direct.hermiticityError)).toBeLessThan(1e-12);
    expect(Math.abs(cheap.commutatorError - direct.commutatorError)).toBeLessThan(1e-12);
    expect(Math.abs(cheap.orthogonalityError - direct.orthogonalityError)).toBeLessThan(1e-12);
    expect(Math.abs(cheap.basisOrthonormalityError - direct.basisOrthonormalityError)).toBeLessThan(1e-12);
    // eigenvalues and the trace carry the scale of Δ: compared relative to λ_max
    expect(Math.abs(cheap.smallestEigenvalue - Math.min(direct.smallestEigenvalue, 0))).toBeLessThan(1e-12 * lambdaMax);
    expect(Math.abs(cheap.trace - direct.trace)).toBeLessThan(1e-12 * lambdaMax);
    // the checks must be sharp enough to be worth comparing: all defects at rounding level
    expect(direct.orthogonalityError).toBeLessThan(1e-12);
    expect(direct.smallestEigenvalue).toBeGreaterThan(-1e-10 * lambdaMax);
  });

  // σ off by up to ±20 %: Re W is no longer ½|Δ|, so W has negative eigenvalues and W W̄ ≠ 0 at order
  // one, and the two forms must still agree (B stays orthonormal, so the kept-basis forms are exact)
  it.each([['none'], ['sqrtN']] as const)('on a state with wrong σ (rule %s), where the checks are large', (rule) => {
    const state = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule }), backend);
    const wrong: SjState = { ...state, sigma: state.sigma.map((v, c) => v * (1 + 0.2 * Math.sin(1.7 * c))) };
    const cheap = sjDiagnostics(wrong, spectrum.positive, backend);
    const direct = directDiagnostics(wrong, backend);
    const lambdaMax = spectrum.positive[0];
    expect(direct.orthogonalityError).toBeGreaterThan(1e-3);
    expect(direct.smallestEigenvalue).toBeLessThan(-1e-3 * lambdaMax);
    expect(Math.abs(cheap.hermiticityError - direct.hermiticityError)).toBeLessThan(1e-12);
    expect(Math.abs(cheap.commutatorError - direct.commutatorError)).toBeLessThan(1e-12);
    expect(Math.abs(cheap.orthogonalityError - direct.orthogonalityError)).toBeLessThan(1e-12);
    expect(Math.abs(cheap.smallestEigenvalue - direct.smallestEigenvalue)).toBeLessThan(1e-12 * lambdaMax);
    expect(Math.abs(cheap.trace - direct.trace)).toBeLessThan(1e-12 * lambdaMax);
    const bound = sjDiagnostics(wrong, spectrum.positive, backend, { exactPositivityLimit: 0 });
    expect(bound.smallestEigenvalue).toBeLessThanOrEqual(direct.smallestEigenvalue);
  });

  // Hutchinson's estimator (Hutchinson 1989; Avron–Toledo 2011): with 32 sign probes the squared norms
  // spread by at most √(2/32) = 25 %, so the norms land within a factor 2 with a wide margin
  const withinFactorTwo = (estimate: number, exact: number) => {
    expect(estimate / exact).toBeGreaterThan(0.5);
    expect(estimate / exact).toBeLessThan(2);
  };

  it('estimates the untruncated checks with random probes past the exact limit: close, reproducible, the bound below', () => {
    const state = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'none' }), backend);
    const exact = sjDiagnostics(state, spectrum.positive, backend);
    const probed = sjDiagnostics(state, spectrum.positive, backend, { exactCompleteLimit: 0 });
    const lambdaMax = spectrum.positive[0];
    expect([exact.checkMethod, exact.probeCount]).toEqual(['exact', 0]);
    expect([probed.checkMethod, probed.probeCount, probed.smallestEigenvalueMethod]).toEqual(['probe', 32, 'probe-bound']);
    // computed exactly either way
    expect(probed.hermiticityError).toBe(exact.hermiticityError);
    expect(probed.commutatorError).toBe(0);
    expect(Math.abs(probed.trace - exact.trace)).toBeLessThan(1e-12 * lambdaMax);
    expect(probed.positiveEigenvalueSum).toBe(exact.positiveEigenvalueSum);
    // estimated
    withinFactorTwo(probed.orthogonalityError, exact.orthogonalityError);
    withinFactorTwo(probed.basisOrthonormalityError, exact.basisOrthonormalityError);
    const rigorous = sjDiagnostics(state, spectrum.positive, backend, { exactPositivityLimit: 0 });
    withinFactorTwo(probed.smallestEigenvalue, rigorous.smallestEigenvalue);
    expect(probed.smallestEigenvalue).toBeLessThanOrEqual(Math.min(exact.smallestEigenvalue, 0));
    // the probes are seeded: the same state gives the same figures
    expect(sjDiagnostics(state, spectrum.positive, backend, { exactCompleteLimit: 0 })).toEqual(probed);
    // truncated states stay exact whatever the limit
    const truncated = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'sqrtN' }), backend);
    expect(sjDiagnostics(truncated, spectrum.positive, backend, { exactCompleteLimit: 0 }).checkMethod).toBe('exact');
  });

  it('the probe estimates track the exact checks on a state with wrong σ, and the bound stays below', () => {
    const state = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule: 'none' }), backend);
    const wrong: SjState = { ...state, sigma: state.sigma.map((v, c) => v * (1 + 0.2 * Math.sin(1.7 * c))) };
    const direct = directDiagnostics(wrong, backend);
    const probed = sjDiagnostics(wrong, spectrum.positive, backend, { exactCompleteLimit: 0 });
    expect(direct.orthogonalityError).toBeGreaterThan(1e-3);
    withinFactorTwo(probed.orthogonalityError, direct.orthogonalityError);
    expect(probed.smallestEigenvalue).toBeLessThanOrEqual(direct.smallestEigenvalue);
    // a non-orthonormal basis shows in the estimate: B scaled by 1.001 has ‖BᵀB − I‖_F = 0.002001 √N
    const stretched: SjState = { ...state, basis: { ...state.basis, data: state.basis.data.map((v) => 1.001 * v) } };
    const estimate = sjDiagnostics(stretched, spectrum.positive, backend, { exactCompleteLimit: 0 }).basisOrthonormalityError;
    withinFactorTwo(estimate, 0.002001 * Math.sqrt(N));
    expect(() => sjDiagnostics(state, spectrum.positive, backend, { exactCompleteLimit: 0, probes: 0 })).toThrow(/probes must be a positive integer/);
  });

  it('bounds the smallest eigenvalue from below past the exact limit', () => {
    for (const rule of ['none', 'sqrtN'] as const) {
      const state = sjState(delta, spectrum, applyTruncation(spectrum.positive, N, { rule }), backend);
      const bound = sjDiagnostics(state, spectrum.positive, backend, { exactPositivityLimit: 0 });
      expect(bound.smallestEigenvalueMethod).toBe('lower-bound');
      const direct = directDiagnostics(state, backend);
      expect(bound.smallestEigenvalue).toBeLessThanOrEqual(Math.min(direct.smallestEigenvalue, 0));
      // √(ε‖Δ‖²) scale: a bound near zero, not a vacuous one
      expect(bound.smallestEigenvalue).toBeGreaterThan(-1e-5 * spectrum.positive[0]);
    }
  });
});
