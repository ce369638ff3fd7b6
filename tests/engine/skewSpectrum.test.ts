import { describe, expect, it } from 'vitest';
import { retardedGreen } from '../../server/engine/green';
import { denseMatrix } from '../../server/engine/linalg';
import type { DenseMatrix } from '../../server/engine/linalg/backend';
import { mlMatrixBackend } from '../../server/engine/linalg/mlMatrixBackend';
import { nativeBackendStatus } from '../../server/engine/linalg/nativeBackend';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sprinkle } from '../../server/engine/sprinkle';
import { runPython } from '../support/python';

/**
 * The native normal form of an antisymmetric Δ (addon.cc SkewSpectrum: our own Householder reduction to
 * antisymmetric tridiagonal form, its bidiagonal half by LAPACK dbdsdc, server/engine/README.md §5–§6).
 * References: numpy's complex Hermitian eigh of iΔ (eigenvalues ±σ, Sorkin 2011) and the defining
 * relations Δa = σb, Δb = −σa of the real normal form of an antisymmetric matrix (common practice).
 */
const native = nativeBackendStatus().backend;

const numpyPositiveEigenvalues = String.raw`
import json, sys
import numpy as np
d = json.load(sys.stdin); n = d['n']
D = np.array(d['delta']).reshape(n, n).T
ev = np.linalg.eigvalsh(1j * D)
print(json.dumps(sorted(ev[ev > 0].tolist(), reverse=True)))
`;

function sprinkledDelta(count: number, seed: string): DenseMatrix {
  const points = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count, seed, prng: 'arc4' }).points;
  return pauliJordan(retardedGreen({ points, dimension: 2, causal: causalMatrix(points, 2) }));
}

function product(a: DenseMatrix, b: DenseMatrix): DenseMatrix {
  return mlMatrixBackend.multiply(a, b);
}

describe.skipIf(!native?.skewSpectrum)('skewSpectrum (native)', () => {
  const backend = native!;

  it.each([
    [400, 'skew-400'],
    [250, 'skew-250'],
  ])('N = %i: σ equal numpy’s positive eigenvalues of iΔ, Δa = σb and Δb = −σa, the columns orthonormal', (n, seed) => {
    const delta = sprinkledDelta(n, seed);
    const input = Float64Array.from(delta.data);
    const { sigma, vectors } = backend.skewSpectrum!(delta);
    expect(Array.from(delta.data)).toEqual(Array.from(input)); // read only without overwriteInput
    expect(sigma.length).toBe(n / 2);
    const reference = runPython<number[]>(numpyPositiveEigenvalues, { n, delta: Array.from(delta.data) });
    const top = reference[0];
    // numpy drops the numerical kernel into ± noise around 0; compare the count it finds above 1e-10 σ_max
    for (let k = 0; k < sigma.length; k++) {
      if (k > 0) expect(sigma[k]).toBeLessThanOrEqual(sigma[k - 1]);
      const expected = reference[k] ?? 0;
      expect(Math.abs(sigma[k] - expected)).toBeLessThan(1e-12 * top);
    }
    const image = product(delta, vectors);
    let residual = 0;
    for (let k = 0; k < n / 2; k++) {
      for (let i = 0; i < n; i++) {
        const a = vectors.data[i + 2 * k * n];
        const b = vectors.data[i + (2 * k + 1) * n];
        residual += (image.data[i + 2 * k * n] - sigma[k] * b) ** 2 + (image.data[i + (2 * k + 1) * n] + sigma[k] * a) ** 2;
      }
    }
    expect(Math.sqrt(residual) / top).toBeLessThan(1e-12);
    const gram = mlMatrixBackend.gram(vectors);
    let defect = 0;
    for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) defect += (gram.data[i + j * n] - (i === j ? 1 : 0)) ** 2;
    expect(Math.sqrt(defect)).toBeLessThan(1e-12);
  });

  it('the kernel comes out near ε‖Δ‖ instead of the √ε‖Δ‖ of the route through ΔᵀΔ', () => {
    const delta = sprinkledDelta(300, 'skew-kernel');
    const skew = pauliJordanSpectrum(delta, { backend });
    const gram = pauliJordanSpectrum(delta, { backend, route: 'gram' });
    expect(skew.sigmaExact).toBe(true);
    expect(gram.sigmaExact).toBe(false);
    const top = skew.positive[0];
    // numpy's complex eigh leaves the kernel of iΔ below 1e-13 λ_max, as the skew route does
    const reference = runPython<number[]>(numpyPositiveEigenvalues, { n: 300, delta: Array.from(delta.data) });
    const numpyKernel = reference.filter((v) => v < 1e-6 * reference[0]);
    const skewKernel = Array.from(skew.positive).filter((v) => v < 1e-6 * top);
    expect(skewKernel.length).toBeGreaterThan(0);
    for (const v of skewKernel) expect(v).toBeLessThan(1e-13 * top);
    for (const v of numpyKernel) expect(v).toBeLessThan(1e-13 * reference[0]);
    // through ΔᵀΔ the same zeros sit far higher (√ε scale), which is what the kernel threshold 1e-6 allows for
    const gramKernel = Array.from(gram.positive).slice(skew.positive.length - skewKernel.length);
    expect(Math.max(...gramKernel)).toBeGreaterThan(1e3 * Math.max(...skewKernel));
    // above the kernel both routes agree
    for (let k = 0; k < skew.positive.length - skewKernel.length; k++) {
      expect(Math.abs(skew.positive[k] - gram.positive[k])).toBeLessThan(1e-10 * top);
    }
  });

  it('an odd N, or a backend without it, goes through ΔᵀΔ', () => {
    const odd = sprinkledDelta(201, 'skew-odd');
    expect(pauliJordanSpectrum(odd, { backend }).sigmaExact).toBe(false);
    expect(pauliJordanSpectrum(sprinkledDelta(200, 'skew-odd'), { backend: mlMatrixBackend }).sigmaExact).toBe(false);
  });

  it('bad input gets a clear error', () => {
    expect(() => backend.skewSpectrum!(denseMatrix(3, 3))).toThrow(/even order/);
    expect(() => backend.skewSpectrum!(denseMatrix(2, 4))).toThrow(/square/);
    const bad = denseMatrix(4, 4);
    bad.data[3] = Number.NaN; // entry (3, 0), in the strict lower triangle it reads
    expect(() => backend.skewSpectrum!(bad)).toThrow(/entry \(3, 0\) is not finite/);
  });
});
