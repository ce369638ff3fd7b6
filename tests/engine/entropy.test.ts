import { beforeAll, describe, expect, it } from 'vitest';
import type { TruncationRule } from '@shared/vacuum';
import { computeVacuum } from '../../server/engine/index';
import { entanglementEntropy, subregionElements } from '../../server/engine/entropy';
import { retardedGreen } from '../../server/engine/green';
import { causalMatrix } from '../../server/engine/order';
import { pauliJordan, pauliJordanSpectrum } from '../../server/engine/pauliJordan';
import { sjState, type SjState } from '../../server/engine/sjState';
import { sprinkle } from '../../server/engine/sprinkle';
import { applyTruncation } from '../../server/engine/truncation';
import { getBackend } from '../../server/engine/linalg';
import type { LinearAlgebraBackend } from '../../server/engine/linalg/backend';

// Statistical test, seeded: three fixed-N sprinklings of N = 600 into the diamond with tips t = ±√2, and
// centred sub-diamonds of growing size. Expected behaviour from Sorkin 2012 / Saravani–Sorkin–Yazdi 2014
// and Sorkin–Yazdi 2018 (server/engine/README.md §9–§10): untruncated S grows like the subregion's spacetime volume,
// double-truncated S ≈ b ln √n + c with b near 1/3 is far smaller.
const seeds = ['ssee-a', 'ssee-b', 'ssee-c'];
const fractions = [0.25, 0.35, 0.5];
const halfHeight = Math.SQRT2;
interface Run {
  points: Float64Array;
  full: SjState;
  cut: SjState;
}
const runs: Run[] = [];

beforeAll(() => {
  for (const seed of seeds) {
    const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 * halfHeight }, process: 'fixed', count: 600, seed, prng: 'arc4' });
    const delta = pauliJordan(retardedGreen({ points: s.points, dimension: 2, causal: causalMatrix(s.points, 2) }));
    const spectrum = pauliJordanSpectrum(delta);
    const state = (rule: TruncationRule) => sjState(delta, spectrum, applyTruncation(spectrum.positive, s.count, rule));
    runs.push({ points: s.points, full: state({ rule: 'none' }), cut: state({ rule: 'sqrtN' }) });
  }
}, 240_000);

function meanEntropies(doubleTruncation: boolean) {
  return fractions.map((f) => {
    let s = 0;
    let n = 0;
    for (const { points, full, cut } of runs) {
      const subregion = { kind: 'diamond' as const, past: { t: -f * halfHeight, x: 0 }, future: { t: f * halfHeight, x: 0 } };
      const elements = subregionElements(subregion, points, 2);
      const e = entanglementEntropy(doubleTruncation ? cut : full, elements, { doubleTruncation });
      s += e.S;
      n += e.n;
    }
    return { S: s / runs.length, n: n / runs.length };
  });
}

describe('spacetime entanglement entropy of sub-diamonds (statistical, seeded)', () => {
  it('grows with n without truncation, with a volume-law size', () => {
    const untruncated = meanEntropies(false);
    for (let k = 1; k < untruncated.length; k++) expect(untruncated[k].S).toBeGreaterThan(untruncated[k - 1].S);
    // a volume law: more than a few tenths of a nat per element everywhere (the double-truncated S is
    // far below that), growing by a clear margin from one size to the next
    untruncated.forEach((e) => expect(e.S / e.n).toBeGreaterThan(0.2));
    for (let k = 1; k < untruncated.length; k++) expect(untruncated[k].S - untruncated[k - 1].S).toBeGreaterThan(5);
  });

  it('is far smaller with double truncation, of the order of ln √n', () => {
    const untruncated = meanEntropies(false);
    const truncated = meanEntropies(true);
    truncated.forEach((e, k) => {
      expect(e.S).toBeGreaterThan(0);
      expect(e.S).toBeLessThan(0.25 * untruncated[k].S);
      // b ln √n + c with b near 1/3 and c of order one: well below ln √n + 2 at these sizes
      expect(e.S).toBeLessThan(Math.log(Math.sqrt(e.n)) + 2);
    });
  });

  it('reports the entropy through the pipeline for a subregion given as element labels', async () => {
    const { points, cut } = runs[0];
    const elements = Array.from(subregionElements({ kind: 'diamond', past: { t: -0.7, x: 0 }, future: { t: 0.7, x: 0 } }, points, 2));
    const viaPipeline = await computeVacuum({
      source: { kind: 'points', points, dimension: 2, region: { kind: 'diamond2d', properTime: 2 * halfHeight } },
      truncation: { rule: 'sqrtN' },
      subregion: { kind: 'elements', indices: elements },
      doubleTruncation: true,
    });
    // double truncation keeps S of order one; with the whole-region cut alone the restricted state of
    // this subregion is pure and S is zero to rounding, below 1e-9 (tests/engine/singleTruncation.test.ts;
    // server/engine/README.md §6, §9), nothing to compare
    const direct = entanglementEntropy(cut, elements, { doubleTruncation: true });
    expect(direct.S).toBeGreaterThan(0.1);
    expect(viaPipeline.entropy?.n).toBe(elements.length);
    expect(Math.abs(viaPipeline.entropy!.S / direct.S - 1)).toBeLessThan(1e-9);
    expect(viaPipeline.density).toBeCloseTo(600 / 4, 10);
  }, 120_000);

  it('the Cholesky route to the κ equals the square-root route it replaces (same S and μ to 1e-9)', () => {
    // Lᵀ Ã⁻¹ L and X̃^½ Ã⁻¹ X̃^½ are orthogonally similar (X̃ = L Lᵀ, L = X̃^½ Q): a linear-algebra fact, not ours
    const backend = getBackend();
    const withoutCholesky: LinearAlgebraBackend = { ...backend, cholesky: () => null };
    const { points, full, cut } = runs[1];
    const elements = subregionElements({ kind: 'diamond', past: { t: -0.6, x: 0 }, future: { t: 0.6, x: 0 } }, points, 2);
    for (const [state, doubleTruncation] of [[full, false], [cut, true]] as const) {
      const viaCholesky = entanglementEntropy(state, elements, { doubleTruncation, backend });
      const viaRoot = entanglementEntropy(state, elements, { doubleTruncation, backend: withoutCholesky });
      expect(viaCholesky.S).toBeGreaterThan(0);
      expect(Math.abs(viaCholesky.S - viaRoot.S)).toBeLessThan(1e-9 * Math.max(1, viaRoot.S));
      expect(viaCholesky.generalizedEigenvalues.length).toBe(viaRoot.generalizedEigenvalues.length);
      viaCholesky.generalizedEigenvalues.forEach((mu, k) => expect(Math.abs(mu - viaRoot.generalizedEigenvalues[k])).toBeLessThan(1e-9 * Math.max(1, Math.abs(mu))));
    }
  });
});
