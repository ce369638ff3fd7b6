import { beforeAll, describe, expect, it } from 'vitest';
import { continuumDiamondSpectrum, tanEqualsTwoXRoots } from '../../server/engine/continuum';
import { retardedGreen } from '../../server/engine/green';
import type { DenseMatrix } from '../../server/engine/linalg/backend';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum, type PauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sjDiagnostics } from '../../server/engine/sjDiagnostics';
import { sjState } from '../../server/engine/sjState';
import { sprinkle } from '../../server/engine/sprinkle';
import { applyTruncation } from '../../server/engine/truncation';
import { runPython } from '../support/python';

const N = 1000;
let delta: DenseMatrix;
let spectrum: PauliJordanSpectrum;

beforeAll(() => {
  // one fixed-N sprinkling of the diamond |t| + |x| ≤ √2, seeded so the run is reproducible
  const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 * Math.SQRT2 }, process: 'fixed', count: N, seed: 'continuum-1000', prng: 'arc4' });
  delta = pauliJordan(retardedGreen({ points: s.points, dimension: 2, causal: causalMatrix(s.points, 2) }));
  spectrum = pauliJordanSpectrum(delta);
});

describe('continuum spectrum of the 2D diamond', () => {
  it('finds the roots of tan x = 2x as scipy.optimize.brentq does', () => {
    // reference: scipy.optimize.brentq on sin x − 2x cos x over the same brackets
    const ours = tanEqualsTwoXRoots(30);
    const theirs = runPython<number[]>(
      `import json, math
from scipy.optimize import brentq
g = lambda x: math.sin(x) - 2*x*math.cos(x)
print(json.dumps([brentq(g, 0.5 if n == 0 else n*math.pi, n*math.pi + math.pi/2, xtol=1e-15, rtol=1e-15) for n in range(30)]))`,
      null,
    );
    theirs.forEach((x, k) => expect(ours[k]).toBeCloseTo(x, 12));
    expect(ours[0]).toBeCloseTo(1.165561, 6); // server/engine/README.md §8
  });

  it('matches λ_1/N and each of the top 20 eigenvalues at N = 1000', () => {
    // Afshordi–Aslanbeigi–Sorkin 2012 via server/engine/README.md §8: λ_k ≈ N/(4 x_k); single sprinklings at
    // N = 1000–2000 agree within 3 % for λ_1 and 5 % for each of the top 20 (numpy check there)
    expect(Math.abs(spectrum.positive[0] / N / 0.21449 - 1)).toBeLessThan(0.03);
    const continuum = continuumDiamondSpectrum(N, 20);
    for (let k = 0; k < 20; k++) expect(Math.abs(spectrum.positive[k] / continuum[k] - 1)).toBeLessThan(0.05);
  });

  it('has about 2√N positive eigenvalues above √N/(4π)', () => {
    // Sorkin–Yazdi 2018 cut with the count from server/engine/README.md §7 (numpy: 62 at N = 1000)
    const t = applyTruncation(spectrum.positive, N, { rule: 'sqrtN' });
    expect(t.cutoff).toBeCloseTo(Math.sqrt(N) / (4 * Math.PI), 12);
    expect(Math.abs(t.modesKept - 2 * Math.sqrt(N))).toBeLessThan(0.1 * 2 * Math.sqrt(N));
  });

  it('places the knee inside the continuum regime and below the √N/(4π) cut', () => {
    // our knee finder must keep only modes that follow the continuum (AAS 2012): within its tolerance
    // plus sprinkling noise, and at least as many as the conservative Sorkin–Yazdi cut
    const knee = applyTruncation(spectrum.positive, N, { rule: 'knee' });
    const sqrtN = applyTruncation(spectrum.positive, N, { rule: 'sqrtN' });
    expect(knee.modesKept).toBeGreaterThanOrEqual(sqrtN.modesKept);
    expect(knee.modesKept).toBeLessThan(N / 4);
    expect(knee.knee?.exponent).toBeGreaterThan(0.9);
    expect(knee.knee?.exponent).toBeLessThan(1.1);
    const continuum = continuumDiamondSpectrum(N, knee.modesKept);
    for (let k = 1; k < knee.modesKept; k++) expect(Math.abs(spectrum.positive[k] / continuum[k] - 1)).toBeLessThan(0.1);
    expect(spectrum.positive[knee.modesKept - 1]).toBeGreaterThan(knee.cutoff);
    expect(spectrum.positive[knee.modesKept]).toBeLessThanOrEqual(knee.cutoff);
  });

  it('satisfies the SJ identities for every truncation rule', () => {
    // server/engine/README.md §5: Hermitian, positive semidefinite, W − W̄ = iΔ_c, W W̄ = 0, tr W = Σ kept λ₊
    const lambdaMax = spectrum.positive[0];
    // (the untruncated state is checked on diamond300 and the entropy ensemble, where it is cheaper)
    for (const rule of [{ rule: 'sqrtN' }, { rule: 'knee' }, { rule: 'modes', count: 40 }, { rule: 'lambda', cut: 5 }] as const) {
      const t = applyTruncation(spectrum.positive, N, rule);
      const d = sjDiagnostics(sjState(delta, spectrum, t), spectrum.positive);
      expect(d.hermiticityError).toBeLessThan(1e-12);
      expect(d.smallestEigenvalueMethod).toBe('exact');
      expect(d.smallestEigenvalue).toBeGreaterThan(-1e-10 * lambdaMax);
      expect(d.commutatorError).toBeLessThan(1e-11);
      expect(d.orthogonalityError).toBeLessThan(1e-12);
      expect(Math.abs(d.trace - d.positiveEigenvalueSum)).toBeLessThan(1e-9 * d.trace);
    }
  });
});
