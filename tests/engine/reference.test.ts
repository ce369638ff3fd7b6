import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { entanglementEntropy, subregionElements } from '../../server/engine/entropy';
import { retardedGreen } from '../../server/engine/green';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum, type PauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sjDiagnostics } from '../../server/engine/sjDiagnostics';
import { sjState } from '../../server/engine/sjState';
import { applyTruncation } from '../../server/engine/truncation';
import type { DenseMatrix } from '../../server/engine/linalg/backend';
import { diamond300Points } from '../support/diamond300';

// Source of every value checked here: fixtures/diamond300.ref.json, computed by numpy 1.24.2 with LAPACK
// (Debian python3-numpy/scipy) on exactly the points of fixtures/diamond300.csv (see fixtures/README.md).
interface Reference {
  N: number;
  n_sub: number;
  positive_eigs: number[];
  lam_cut: number;
  n_pos_above_cut: number;
  S_untruncated: number;
  S_double_truncated: number;
  kept_sub_untr: number;
  kept_sub_tr: number;
  W_trace: number;
}

const ref: Reference = JSON.parse(readFileSync(new URL('../../fixtures/diamond300.ref.json', import.meta.url), 'utf8'));
const points = diamond300Points();
const subregion = { kind: 'diamond' as const, past: { t: -Math.SQRT1_2, x: 0 }, future: { t: Math.SQRT1_2, x: 0 } };

let delta: DenseMatrix;
let spectrum: PauliJordanSpectrum;

beforeAll(() => {
  const causal = causalMatrix(points, 2);
  delta = pauliJordan(retardedGreen({ points, dimension: 2, causal }));
  spectrum = pauliJordanSpectrum(delta);
});

describe('diamond300 against the numpy/LAPACK reference', () => {
  it('reproduces every positive eigenvalue of iΔ', () => {
    expect(spectrum.positive.length).toBe(ref.positive_eigs.length);
    const top = ref.positive_eigs[0];
    ref.positive_eigs.forEach((expected, k) => {
      // server/engine/README.md §6: through ΔᵀΔ a mode comes out to about ε‖Δ‖²/σ, so large eigenvalues are
      // compared relatively (1e-8) and the near-zero ones (true zeros, here down to 1e-16, which come
      // out near √ε λ_max) absolutely, relative to λ_max (1e-8)
      const error = Math.abs(spectrum.positive[k] - expected);
      expect(error).toBeLessThan(1e-8 * expected + 1e-8 * top);
      if (expected > 1e-2 * top) expect(error / expected).toBeLessThan(1e-8);
    });
  });

  it('has the same cut √N/(4π) and count above it', () => {
    const t = applyTruncation(spectrum.positive, ref.N, { rule: 'sqrtN' });
    expect(t.cutoff).toBeCloseTo(ref.lam_cut, 14);
    expect(t.modesKept).toBe(ref.n_pos_above_cut);
  });

  it('gives the untruncated and the double-truncated entropy within 1e-8 relative', () => {
    const elements = subregionElements(subregion, points, 2);
    expect(elements.length).toBe(ref.n_sub);

    const full = sjState(delta, spectrum, applyTruncation(spectrum.positive, ref.N, { rule: 'none' }));
    const untruncated = entanglementEntropy(full, elements);
    expect(Math.abs(untruncated.S / ref.S_untruncated - 1)).toBeLessThan(1e-8);
    expect(untruncated.modesKept).toBe(ref.kept_sub_untr);

    const cut = sjState(delta, spectrum, applyTruncation(spectrum.positive, ref.N, { rule: 'sqrtN' }));
    const doubled = entanglementEntropy(cut, elements, { doubleTruncation: true });
    expect(Math.abs(doubled.S / ref.S_double_truncated - 1)).toBeLessThan(1e-8);
    expect(doubled.modesKept).toBe(ref.kept_sub_tr);

    // the generalized eigenvalues come in pairs μ, 1 − μ and reproduce S = Σ μ ln|μ| (server/engine/README.md §9)
    const mu = doubled.generalizedEigenvalues;
    let sum = 0;
    for (const m of mu) sum += m * Math.log(Math.abs(m));
    expect(sum).toBeCloseTo(doubled.S, 8);
    const sorted = Array.from(mu).sort((a, b) => a - b);
    sorted.forEach((m, i) => expect(m + sorted[sorted.length - 1 - i]).toBeCloseTo(1, 8));
  });

  it('satisfies the SJ identities, with tr W equal to the reference trace', () => {
    // server/engine/README.md §5: W Hermitian, positive semidefinite, W − W̄ = iΔ_c, W W̄ = 0, tr W = Σ λ₊
    for (const rule of [{ rule: 'none' as const }, { rule: 'sqrtN' as const }, { rule: 'knee' as const }]) {
      const truncation = applyTruncation(spectrum.positive, ref.N, rule);
      const d = sjDiagnostics(sjState(delta, spectrum, truncation), spectrum.positive);
      expect(d.hermiticityError).toBeLessThan(1e-12);
      expect(d.smallestEigenvalueMethod).toBe('exact');
      expect(d.smallestEigenvalue).toBeGreaterThan(-1e-10 * ref.positive_eigs[0]);
      expect(d.commutatorError).toBeLessThan(1e-12);
      expect(d.orthogonalityError).toBeLessThan(1e-12);
      expect(Math.abs(d.trace - d.positiveEigenvalueSum)).toBeLessThan(1e-9 * d.trace);
      if (rule.rule === 'none') expect(Math.abs(d.trace / ref.W_trace - 1)).toBeLessThan(1e-8);
    }
  });
});
