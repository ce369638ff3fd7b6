import { beforeAll, describe, expect, it } from 'vitest';
import type { RenyiOrder } from '@shared/vacuum';
import { computeVacuum, renyiEntropy, type VacuumResult } from '../../server/engine/index';
import { diamond300Points, diamond300Reference } from '../support/diamond300';
import { numpyModeRenyi, numpySubregionEntropies, type NumpySetEntropy } from './numpySubregionReference';

// Rényi entropies of the subregion from the generalised eigenvalues μ (server/engine/README.md §15) on the
// diamond300 fixture (server/engine/README.md §13). Outside references: the fixture's stored numpy S, the
// independent numpy reference of tests/engine/numpySubregionReference.ts (its own μ, and S_α as Fock-ladder
// sums over the thermal mode of each pair, not the closed formula), and two facts of the trade (common
// practice): S_α → S as α → 1, and S_α does not increase with α.

const points = diamond300Points();
const ref = diamond300Reference<{ N: number; n_sub: number; S_untruncated: number; S_double_truncated: number }>();
const region = { kind: 'diamond2d' as const, properTime: 2 * Math.SQRT2 };
const subregion = { kind: 'diamond' as const, past: { t: -Math.SQRT1_2, x: 0 }, future: { t: Math.SQRT1_2, x: 0 } };
const orders: RenyiOrder[] = [0.5, 2, 3, 'inf'];
const cases = [
  { name: 'untruncated', truncation: { rule: 'none' as const }, doubleTruncation: false, stored: ref.S_untruncated },
  { name: 'double truncated at √N/(4π) and √n/(4π)', truncation: { rule: 'sqrtN' as const }, doubleTruncation: true, stored: ref.S_double_truncated },
];

describe.each(cases)('Rényi entropies on diamond300, $name', (c) => {
  let result: VacuumResult;
  let numpy: NumpySetEntropy;
  beforeAll(async () => {
    result = await computeVacuum({
      source: { kind: 'points', points, dimension: 2, region },
      truncation: c.truncation,
      doubleTruncation: c.doubleTruncation,
      subregion,
      renyi: orders,
      engine: 'dense',
    });
    numpy = numpySubregionEntropies({
      points,
      stateCut: c.truncation.rule === 'none' ? 0 : Math.sqrt(ref.N) / (4 * Math.PI),
      double: c.doubleTruncation,
      sets: [result.entropy!.elements],
      orders,
    }).sets[0]!;
  }, 120_000);

  it('computes the entropy of the stored fixture subregion (fixtures/diamond300.ref.json, numpy 1.24.2)', () => {
    expect(result.entropy!.n).toBe(ref.n_sub);
    expect(Math.abs(result.entropy!.S / c.stored - 1)).toBeLessThan(1e-7);
    expect(Math.abs(numpy.S / c.stored - 1)).toBeLessThan(1e-7);
  });

  it('gives S_0.5, S_2, S_3 and S_∞ as numpy does from its own μ (Fock-ladder sums)', () => {
    // tolerance: the μ agree to 1e-7 relative untruncated, 1e-9 after the second cut (tests/engine/entropyReferences.test.ts)
    const tolerance = c.doubleTruncation ? 1e-9 : 1e-7;
    expect(numpy.maxImagMu).toBeLessThan(1e-9);
    const renyi = result.entropy!.renyi!;
    expect(Object.keys(renyi).sort()).toEqual(['0.5', '2', '3', 'inf']);
    for (const key of Object.keys(renyi)) {
      expect(numpy.renyi[key]!).toBeGreaterThan(0.1);
      expect(Math.abs(renyi[key]! / numpy.renyi[key]! - 1)).toBeLessThan(tolerance);
    }
  });

  it('tends to S as α → 1 from either side (common practice: the limit of the Rényi family)', () => {
    const mu = result.entropy!.generalizedEigenvalues;
    const S = result.entropy!.S;
    for (const alpha of [1 - 1e-6, 1 + 1e-6]) {
      // S_α − S is of order (α − 1) times the variance of the modular Hamiltonian, here below 1e-4 S
      expect(Math.abs(renyiEntropy(mu, alpha) / S - 1)).toBeLessThan(1e-5);
    }
    expect(renyiEntropy(mu, 1 + 1e-6)).toBeLessThan(S);
    expect(renyiEntropy(mu, 1 - 1e-6)).toBeGreaterThan(S);
  });

  it('does not increase with α over a grid from 0.05 to ∞ (common practice)', () => {
    const mu = result.entropy!.generalizedEigenvalues;
    const grid: (RenyiOrder | 1)[] = [0.05, 0.25, 0.5, 0.9, 1, 1.1, 1.5, 2, 3, 5, 10, 50, 'inf'];
    const values = grid.map((alpha) => renyiEntropy(mu, alpha));
    for (let k = 1; k < values.length; k++) expect(values[k]!).toBeLessThanOrEqual(values[k - 1]! * (1 + 1e-12));
    // and strictly for a mixed state: the min-entropy is well below S
    expect(values.at(-1)!).toBeLessThan(0.9 * result.entropy!.S);
  });
});

describe('renyiEntropy at the ends of its range', () => {
  it('matches Fock-ladder sums in numpy for μ near 1, μ large and small or large α', () => {
    // pairs (μ, 1 − μ), descending as the engine lists them
    const upper = [2000, 37.5, 2.25, 1 + 1e-7];
    const mu = [...upper, ...upper.map((m) => 1 - m).reverse()];
    const alphas = [0.05, 0.5, 2, 7];
    const reference = numpyModeRenyi(upper, alphas);
    alphas.forEach((alpha, i) => {
      upper.forEach((m, j) => {
        const single = renyiEntropy([m, 1 - m], alpha);
        // numpy's long sums (up to 2.4e6 terms) carry about 1e-12 relative rounding
        expect(Math.abs(single - reference[i]![j]!)).toBeLessThan(1e-10 * Math.max(1, Math.abs(reference[i]![j]!)));
      });
      expect(Math.abs(renyiEntropy(mu, alpha) - reference[i]!.reduce((s, v) => s + v, 0))).toBeLessThan(1e-9);
    });
  });

  it('counts a pure mode (μ = 1, or a rounding below it) as zero', () => {
    expect(renyiEntropy([1, 0], 2)).toBe(0);
    expect(renyiEntropy([1 - 1e-15, 1e-15], 'inf')).toBe(0);
  });
});
