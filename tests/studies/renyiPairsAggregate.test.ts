import { describe, expect, it } from 'vitest';
import type { StudyEntropy } from '@shared/studies';
import { sprinkledStudyRequestSchema } from '@shared/studies';
import { formatQuantity } from '@shared/precision';
import { aggregateEntropies, fitAggregates, pairDecayFits } from '../../server/studies/aggregate';
import { resolveSubregions } from '../../server/studies/plan';
import { aggregatesCsv, latexTable, methodsParagraph, provenanceJson, tidyCsv, type StudyExportInput } from '../../server/exports/studies';
import { runPython } from '../support/python';

const base = { cellId: 'c', N: 400, elements: 400, fraction: null, rule: 'none', modesKept: 4, cutoff: 0, stateModesKept: 100, stateCutoff: 0 };

/**
 * A synthetic pair table: ℓ/T = 0.2 at d/T = 0.05, 0.1, 0.2 with I = 0.01 (d/T)^−1 exactly in the mean
 * (two seeds at I(1 ± 0.1)), and d/T = 0.3 with ⟨I⟩ < 0. By hand: each mean is I, the two deviations ±0.1 I
 * give sd = √(2 (0.1 I)²/1) = 0.1√2 I and SE = sd/√2 = 0.1 I, so σ of ln⟨I⟩ is SE/⟨I⟩ = 0.1 for every
 * point (w = 100). ln⟨I⟩ = ln 0.01 − ln(d/T) exactly: slope −1, intercept ln 0.01. The x = ln(d/T) are
 * spaced by ln 2, Σ(x − x̄)² = 2 (ln 2)², Δ = w² · 3 · 2 (ln 2)², so σ_slope² = Σw/Δ = 1/(200 (ln 2)²):
 * σ_slope = 1/(√200 ln 2) ≈ 0.10201. The d/T = 0.3 point (⟨I⟩ ≤ 0) is left out: excluded 1.
 */
function pairRows(): StudyEntropy[] {
  const rows: StudyEntropy[] = [];
  for (const d of [0.05, 0.1, 0.2]) {
    const I = 0.01 / d;
    for (const [seed, factor] of [['a', 0.9], ['b', 1.1]] as const) {
      const value = I * factor;
      rows.push({
        ...base, seed, subregion: `pair l/L=0.2 d/L=${d}`, n: 32, S: 2 - value,
        renyi: { '2': 1.5 - value / 2 },
        pair: { size: 0.2, separation: d, SA: 1, SB: 1, SAB: 2 - value, I: value, nA: 16, nB: 16, renyiI: { '2': value / 2 } },
      });
    }
  }
  for (const [seed, value] of [['a', -0.02], ['b', 0.01]] as const) {
    rows.push({ ...base, seed, subregion: 'pair l/L=0.2 d/L=0.3', n: 32, S: 2 - value, pair: { size: 0.2, separation: 0.3, SA: 1, SB: 1, SAB: 2 - value, I: value, nA: 16, nB: 16 } });
  }
  return rows;
}

describe('aggregates and fits of pairs and Rényi orders', () => {
  it('means ± SE of I and I_α per (N, pair, rule), and the log-log fit of I against d (hand computed)', () => {
    const aggregates = aggregateEntropies(pairRows());
    const first = aggregates.find((a) => a.subregion === 'pair l/L=0.2 d/L=0.05')!;
    expect(first.pair!.meanI).toBeCloseTo(0.2, 14);
    expect(first.pair!.seI).toBeCloseTo(0.02, 14);
    expect(first.pair!.renyiI!['2']!.mean).toBeCloseTo(0.1, 14);
    const fits = fitAggregates(aggregates);
    // pairs get no fit of S against ln √n (their S is that of A∪B)
    expect(fits.filter((f) => f.model !== 'loglog')).toEqual([]);
    const [fit] = fits;
    expect(fits).toHaveLength(1);
    expect(fit).toMatchObject({ rule: 'none', model: 'loglog', quantity: 'I', size: 0.2, N: 400, points: 3, excluded: 1, weighting: 'inverse-variance' });
    expect(fit!.slope).toBeCloseTo(-1, 12);
    expect(fit!.intercept).toBeCloseTo(Math.log(0.01), 12);
    expect(fit!.slopeError).toBeCloseTo(1 / (Math.sqrt(200) * Math.LN2), 12);
    expect(fit!.reducedChiSquared).toBeCloseTo(0, 12);
  });

  it('puts beside it the log-log slope of the continuum trend (1/3) ln[(ℓ+d)²/(d(2ℓ+d))] at the same d/T, as numpy.polyfit gives it', () => {
    const [fit] = pairDecayFits(aggregateEntropies(pairRows()));
    // numpy: a straight line through (ln d, ln I_cont(d)), Calabrese–Cardy 2004 / Casini–Huerta 2009 two-interval form
    const expected = runPython<number>(
      `
import json, sys
import numpy as np
d = np.array(json.load(sys.stdin))
l = 0.2
I = np.log((l + d) ** 2 / (d * (2 * l + d))) / 3
print(json.dumps(float(np.polyfit(np.log(d), np.log(I), 1)[0])))
`,
      [0.05, 0.1, 0.2],
    );
    expect(fit!.continuum!.slope).toBeCloseTo(expected, 12);
    expect(fit!.continuum).toMatchObject({ from: 0.05, to: 0.2 });
  });

  it('needs three separations with ⟨I⟩ > 0', () => {
    const rows = pairRows().filter((r) => r.pair!.separation !== 0.2);
    expect(pairDecayFits(aggregateEntropies(rows))).toEqual([]);
  });

  it('fits each S_α against ln √n with the same code as S', () => {
    // S = 0.5 ln n exactly and S_2 = 0.25 ln n: slopes against ln √n = ½ ln n are 1 and 0.5
    const rows: StudyEntropy[] = [16, 64, 256].flatMap((n, k) =>
      ['a', 'b'].map((seed, j) => ({ ...base, N: 100 * 2 ** k, seed, subregion: 'l/L=0.5', fraction: 0.5, n, S: 0.5 * Math.log(n) + (j ? 0.01 : -0.01), renyi: { '2': 0.25 * Math.log(n) + (j ? 0.01 : -0.01) } })),
    );
    const aggregates = aggregateEntropies(rows);
    expect(aggregates[0]!.renyi!['2']!.mean).toBeCloseTo(0.25 * Math.log(16), 14);
    expect(aggregates[0]!.renyi!['2']!.se).toBeCloseTo(0.01, 14);
    const fits = fitAggregates(aggregates);
    expect(fits.find((f) => f.quantity === 'S' && f.model === 'log')!.slope).toBeCloseTo(1, 12);
    const renyi = fits.find((f) => f.quantity === 'renyi:2')!;
    expect(renyi).toMatchObject({ model: 'log', subregion: null, points: 3 });
    expect(renyi.slope).toBeCloseTo(0.5, 12);
    expect(fits.filter((f) => f.quantity === 'renyi:2' && f.model === 'linear')).toEqual([]);
  });
});

describe('exports of a pair study with Rényi orders', () => {
  const request = sprinkledStudyRequestSchema.parse({
    source: 'sprinkled', title: 'pairs', counts: [400], seeds: ['a', 'b'], rules: [{ truncation: { rule: 'none' } }],
    subregions: { kind: 'pairs', sizes: [0.2], separations: [0.05, 0.1, 0.2, 0.3] }, renyi: ['inf', 2],
  });
  const entropies = pairRows();
  const aggregates = aggregateEntropies(entropies);
  const fits = fitAggregates(aggregates);
  const input: StudyExportInput = {
    id: '0123abcd-0000-4000-8000-000000000000', title: 'pairs', status: 'done', author: 'Tomas Okafor', createdAt: '2026-01-01T00:00:00.000Z',
    finishedAt: null, request, causalSets: [], subregions: resolveSubregions(request), entropies, aggregates, fits, cells: [],
  };

  it('carries S_α and the pair columns in both CSVs, orders ascending with ∞ last', () => {
    const tidy = tidyCsv(entropies, request.rules, ['2', 'inf']).split('\n');
    const header = tidy[0]!.split(',');
    expect(header.slice(15)).toEqual(['S_alpha_2', 'S_alpha_inf', 'pair_l_over_L', 'd_over_L', 'S_A', 'S_B', 'S_AB', 'I', 'n_A', 'n_B', 'I_alpha_2', 'I_alpha_inf']);
    const row = tidy[1]!.split(',');
    expect(Number(row[header.indexOf('I')])).toBeCloseTo(0.18, 14);
    expect(row[header.indexOf('n_A')]).toBe('16');
    expect(row[header.indexOf('S_alpha_inf')]).toBe(''); // this synthetic row has only S_2
    const agg = aggregatesCsv(aggregates, request.rules, ['2', 'inf']).split('\n');
    const aggHeader = agg[0]!.split(',');
    expect(aggHeader).toEqual(expect.arrayContaining(['mean_S_alpha_2', 'se_S_alpha_2', 'mean_I', 'sd_I', 'se_I', 'mean_I_alpha_2']));
    expect(Number(agg[1]!.split(',')[aggHeader.indexOf('mean_I')])).toBeCloseTo(0.2, 14);
  });

  it('gives LaTeX tables of ⟨I⟩(d) and of the fits, and a methods paragraph stating the measured comparison', () => {
    const tex = latexTable(input);
    expect(tex).toContain('tab:tacet-study-0123abcd-mutual-information');
    expect(tex).toMatch(/400 & 0\.2 & 0\.05 & \$0\.200 \\pm 0\.020\$/);
    expect(tex).toContain('$-1.00 \\pm 0.10$');
    const methods = methodsParagraph(input);
    expect(methods).toContain('I(A:B) = S_A + S_B − S_{A∪B}');
    expect(methods).toContain('its own restricted cut');
    expect(methods).toMatch(/S_α = Σ_\{μ>1\} ln\(μ\^α − \(μ−1\)\^α\)\/\(α − 1\)/);
    const slope = fits[0]!.continuum!.slope;
    expect(methods).toContain(`measured slope −1.00 ± 0.10 against continuum trend ${formatQuantity(slope, 'fit')} over d/T ∈ [0.05, 0.2] (3 points; 1 separation with ⟨I⟩ ≤ 0 left out)`);
    expect(methods).toContain('Casini and Huerta 2009');
    expect(provenanceJson(input).renyiOrders).toEqual(['2', 'inf']);
  });
});
