import { describe, expect, it } from 'vitest';
import type { StudyEntropy } from '@shared/studies';
import { aggregateEntropies, fitAggregates } from '../../server/studies/aggregate';
import { computeStudyCell } from '../../server/studies/cell';
import { resolveSubregions } from '../../server/studies/plan';

/**
 * A small statistical check of the physics a study exists for (seeded, so it always draws the same
 * sprinklings; statistical in that it tests ensemble means, not single values). Expected behaviour,
 * physics notes §5: without truncation S grows with n (a spacetime volume law; Saravani–Sorkin–Yazdi
 * 2014), with double truncation S ≈ b ln √n + c with b near 1/3 (Calabrese–Cardy 2004 for the
 * continuum; on causal sets Sorkin–Yazdi 2018). At N ≤ 800 finite-size effects are large (these seeds
 * give b ≈ 0.51 ± 0.09; other seed sets at N = 150–600 gave 0.37–0.70), so the band is wide: 0.1 < b < 0.9.
 * About 4 s on the native backend, 40 s on ml-matrix.
 */
describe('entropy scaling on small 2D diamonds (statistical, seeded)', () => {
  it('untruncated S grows with n; the double-truncated b lies in a wide band around 1/3', async () => {
    const region = { kind: 'diamond2d', properTime: 2 } as const;
    const subregions = resolveSubregions({ region, subregions: { kind: 'concentric', fractions: [0.5] } });
    const rules = [
      { truncation: { rule: 'none' as const }, doubleTruncation: false },
      { truncation: { rule: 'sqrtN' as const }, doubleTruncation: true },
    ];
    const entropies: StudyEntropy[] = [];
    for (const N of [200, 400, 800]) {
      for (const seed of ['scaling-1', 'scaling-2', 'scaling-3']) {
        const cell = await computeStudyCell({ sprinkling: { region, count: N, seed }, mass: 0, subregions, rules });
        for (const e of cell.entropies) {
          entropies.push({ ...e, cellId: `${N}-${seed}`, N, elements: cell.N, seed, fraction: 0.5, stateModesKept: 0, stateCutoff: 0 });
        }
      }
    }
    const aggregates = aggregateEntropies(entropies);
    const untruncated = aggregates.filter((a) => a.rule === 'none');
    expect(untruncated.map((a) => a.N)).toEqual([200, 400, 800]);
    for (let k = 1; k < untruncated.length; k++) expect(untruncated[k]!.meanS).toBeGreaterThan(untruncated[k - 1]!.meanS);
    const fits = fitAggregates(aggregates);
    const volume = fits.find((f) => f.rule === 'none' && f.model === 'linear')!;
    expect(volume.slope).toBeGreaterThan(0);
    expect(volume.slope - 2 * volume.slopeError!).toBeGreaterThan(0);

    const b = fits.find((f) => f.rule === 'sqrtN+double' && f.model === 'log')!;
    expect(b.weighting).toBe('inverse-variance');
    expect(b.slope).toBeGreaterThan(0.1);
    expect(b.slope).toBeLessThan(0.9);
    // the double-truncated entropy is far below the untruncated one at every size (SSY 2014, SY 2018)
    for (const a of aggregates.filter((x) => x.rule === 'sqrtN+double')) {
      expect(a.meanS).toBeLessThan(0.5 * untruncated.find((u) => u.N === a.N)!.meanS);
    }
  }, 120_000);
});
