import { describe, expect, it } from 'vitest';
import type { StudyEntropy } from '@shared/studies';
import { aggregateEntropies, fitAggregates, meanAndDeviation, weightedLineFit } from '../../server/studies/aggregate';
import { runPython } from '../support/python';

const entropy = (over: Partial<StudyEntropy>): StudyEntropy => ({
  cellId: 'c', N: 100, elements: 100, seed: 's', subregion: 'l/L=0.5', fraction: 0.5, rule: 'none', n: 25, S: 1,
  modesKept: 2, cutoff: 0, stateModesKept: 50, stateCutoff: 0, ...over,
});

describe('aggregation over seeds', () => {
  it('gives mean, sample deviation and standard error per (N, subregion, rule) — hand computed', () => {
    // S = 1.0, 1.2, 1.7: mean 1.3; deviations −0.3, −0.1, 0.4; Σd² = 0.26; sd = √(0.26/2) = √0.13;
    // SE = sd/√3 = √(0.13/3). n = 24, 25, 29: mean 26. elements 100, 100, 103 (Poisson-like): mean 101.
    const rows = [
      entropy({ seed: 'a', S: 1.0, n: 24 }),
      entropy({ seed: 'b', S: 1.2, n: 25 }),
      entropy({ seed: 'c', S: 1.7, n: 29, elements: 103 }),
      entropy({ seed: 'a', S: 0.4, rule: 'sqrtN+double' }),
      entropy({ seed: 'a', S: 5, N: 50, elements: 50 }),
    ];
    const aggregates = aggregateEntropies(rows);
    expect(aggregates.map((a) => [a.rule, a.N, a.seeds])).toEqual([['none', 50, 1], ['none', 100, 3], ['sqrtN+double', 100, 1]]);
    const three = aggregates[1]!;
    expect(three.meanS).toBeCloseTo(1.3, 14);
    expect(three.sdS).toBeCloseTo(Math.sqrt(0.13), 14);
    expect(three.seS).toBeCloseTo(Math.sqrt(0.13 / 3), 14);
    expect(three.meanN).toBeCloseTo(26, 14);
    expect(three.meanElements).toBeCloseTo(101, 14);
    // one seed: no spread to report
    expect(aggregates[0]).toMatchObject({ meanS: 5, sdS: null, seS: null });
  });

  it('refuses to average nothing', () => {
    expect(() => meanAndDeviation([])).toThrow(/no values/);
  });
});

describe('weighted least-squares line', () => {
  it('matches the hand computation with weights 1/σ²', () => {
    // x = 0, 1, 2; y = 1, 3, 4; σ = 1, 1, 2 → w = 1, 1, ¼. Σw = 9/4, Σwx = 3/2, Σwy = 5, Σwx² = 2,
    // Σwxy = 5, Δ = Σw Σwx² − (Σwx)² = 9/4. slope = (9/4·5 − 3/2·5)/Δ = 5/3; intercept = (2·5 − 3/2·5)/Δ
    // = 10/9; σ_slope² = Σw/Δ = 1; σ_intercept² = Σwx²/Δ = 8/9. Residuals −1/9, 2/9, −4/9:
    // χ² = 1/81 + 4/81 + ¼·16/81 = 1/9 (one degree of freedom). Weighted mean ȳ = 20/9,
    // Σw(y − ȳ)² = 121/81 + 49/81 + 64/81 = 234/81, so R² = 1 − 9/234 = 25/26.
    const fit = weightedLineFit([0, 1, 2], [1, 3, 4], [1, 1, 2]);
    expect(fit.weighting).toBe('inverse-variance');
    expect(fit.slope).toBeCloseTo(5 / 3, 13);
    expect(fit.intercept).toBeCloseTo(10 / 9, 13);
    expect(fit.slopeError).toBeCloseTo(1, 13);
    expect(fit.interceptError).toBeCloseTo(Math.sqrt(8) / 3, 13);
    expect(fit.reducedChiSquared).toBeCloseTo(1 / 9, 13);
    expect(fit.rSquared).toBeCloseTo(25 / 26, 13);
  });

  it('falls back to ordinary least squares when a point has no standard error', () => {
    // x = 1..4, y = 2, 4, 5, 4: x̄ = 2.5, ȳ = 3.75, Sxx = 5, Sxy = 3.5 → slope 0.7, intercept 2.
    // Residuals −0.7, 0.6, 0.9, −0.8: SSR = 2.3, s² = 2.3/2 = 1.15, σ_slope = √(s²/Sxx) = √0.23,
    // σ_intercept = √(s² Σx²/(m Sxx)) = √(1.15·30/20); SST = 4.75, R² = 1 − 2.3/4.75.
    const fit = weightedLineFit([1, 2, 3, 4], [2, 4, 5, 4], [0.1, null, 0.1, 0.1]);
    expect(fit.weighting).toBe('unweighted');
    expect(fit.slope).toBeCloseTo(0.7, 13);
    expect(fit.intercept).toBeCloseTo(2, 13);
    expect(fit.slopeError).toBeCloseTo(Math.sqrt(0.23), 13);
    expect(fit.interceptError).toBeCloseTo(Math.sqrt((1.15 * 30) / 20), 13);
    expect(fit.rSquared).toBeCloseTo(1 - 2.3 / 4.75, 13);
    expect(fit.reducedChiSquared).toBeNull();
    // two points: a line through both, no error estimate
    expect(weightedLineFit([0, 1], [1, 2], null)).toMatchObject({ slope: 1, intercept: 1, slopeError: null });
  });

  it('agrees with numpy.polyfit(w = 1/σ, cov = "unscaled") on scattered data', () => {
    // numpy (Debian python3-numpy) as the outside reference; cov='unscaled' takes the σ as known.
    const xs = [1.2, 1.5, 1.9, 2.3, 2.6, 3.1, 3.4];
    const ys = [0.61, 0.70, 0.86, 0.97, 1.12, 1.24, 1.38];
    const sigmas = [0.05, 0.04, 0.06, 0.03, 0.05, 0.04, 0.07];
    const ref = runPython<{ p: number[]; cov: number[][] }>(
      `import json, sys, numpy as np
d = json.load(sys.stdin)
p, cov = np.polyfit(d['x'], d['y'], 1, w=1/np.array(d['s']), cov='unscaled')
print(json.dumps({'p': p.tolist(), 'cov': cov.tolist()}))`,
      { x: xs, y: ys, s: sigmas },
    );
    const fit = weightedLineFit(xs, ys, sigmas);
    expect(fit.slope).toBeCloseTo(ref.p[0]!, 12);
    expect(fit.intercept).toBeCloseTo(ref.p[1]!, 12);
    expect(fit.slopeError).toBeCloseTo(Math.sqrt(ref.cov[0]![0]!), 12);
    expect(fit.interceptError).toBeCloseTo(Math.sqrt(ref.cov[1]![1]!), 12);
  });

  it('refuses a line through points that share one x', () => {
    expect(() => weightedLineFit([2, 2, 2], [1, 2, 3], null)).toThrow(/different x/);
    expect(() => weightedLineFit([1], [1], null)).toThrow(/at least two points/);
  });
});

describe('fits of a study', () => {
  it('fits S against ln √n̄ and n̄ per rule and per subregion, recovering a known line', () => {
    // S = b ln √n + c exactly with b = 1/3, c = 0.5 at n = 25, 100, 400 for two sub-diamonds: every
    // log fit returns b = 1/3 and R² = 1.
    const rows: StudyEntropy[] = [];
    for (const [N, sub, n] of [[100, 'a', 25], [400, 'a', 100], [1600, 'a', 400], [100, 'b', 36], [400, 'b', 144], [1600, 'b', 576]] as const) {
      for (const [seed, noise] of [['s1', 0.01], ['s2', -0.01]] as const) {
        rows.push(entropy({ N, subregion: sub, fraction: sub === 'a' ? 0.5 : 0.6, n, seed, S: Math.log(Math.sqrt(n)) / 3 + 0.5 + noise }));
      }
    }
    const fits = fitAggregates(aggregateEntropies(rows));
    const logFits = fits.filter((f) => f.model === 'log');
    expect(logFits.map((f) => f.subregion)).toEqual([null, 'a', 'b']);
    for (const f of logFits) {
      expect(f.slope).toBeCloseTo(1 / 3, 12);
      expect(f.intercept).toBeCloseTo(0.5, 12);
      expect(f.rSquared).toBeCloseTo(1, 12);
      expect(f.weighting).toBe('inverse-variance');
    }
    expect(fits.filter((f) => f.model === 'linear')).toHaveLength(3);
  });
});
