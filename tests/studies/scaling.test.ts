import { describe, expect, it } from 'vitest';
import type { StudyEntropy } from '@shared/studies';
import { aggregateEntropies, fitAggregates } from '../../server/studies/aggregate';
import { computeStudyCell } from '../../server/studies/cell';
import { resolveSubregions } from '../../server/studies/plan';
import { backendSelection } from '../../server/engine/linalg';

/**
 * A statistical check of the physics a study exists for (seeded, so it always draws the same
 * sprinklings; statistical in that it tests ensemble means, not single values). Expected behaviour
 * (server/engine/README.md §9–§10): without truncation S grows like the subregion's spacetime volume (Saravani–Sorkin–
 * Yazdi 2014, CQG 31 214006); with double truncation S ≈ b ln √n + c with b = c/3 = 1/3 for one free
 * boson (Calabrese–Cardy 2004, J. Stat. Mech. P06002; on causal sets with double truncation Sorkin–Yazdi
 * 2018, CQG 35 074004; both values recalled from memory).
 *
 * Ensemble: fixed-N sprinklings of N = 400, 800, 1600 into the diamond of proper time 2, ten seeds
 * (nested: a seed's N points are the first N of its 2N), and five sub-diamonds of proper time 1 (the
 * centred one and four shifted by ¼ in t or x) whose fitted b are averaged. ℓ/T is fixed, so b is the
 * ultraviolet scaling with density (varying ℓ/T at fixed N mixes in the finite size of the region and
 * gave b < 0). Measured with the native backend before the band was set, on 59 seeds (these ten among
 * them): the per-seed b of this design has mean 0.39 and scatters by 0.12, so ten seeds give
 * b ≈ 0.39 ± 0.04 (random ten-seed ensembles 0.28–0.49; these ten give 0.47, the high side). Smaller
 * sizes drift upwards (N = 200–800: 0.45–0.5; the local slope falls from ≈ 0.45 at 400→800 to ≈ 0.3–0.33
 * at 800→1600 and 1600→3200), and a single sub-diamond scatters 1.5–2.3 times as much. The band
 * [0.25, 0.55] (1/3 × 0.75 to 1/3 × 1.65) holds b with 3.5σ below and 4σ above, while a slope of 1/6
 * or 2/3, or a factor-2 error in S (which scales b alike, here to 0.23 or 0.93), falls outside it.
 * About 20 s on the native backend (what CI runs); on the JavaScript fallback each N = 1600 cell takes
 * about 1.5 min (≈ 18 min in all), so there it is skipped, as the large-N knee checks are
 * (tests/engine/kneeValidation.test.ts); the volume law alone is also checked on both backends in
 * tests/engine/entropy.test.ts.
 */
const region = { kind: 'diamond2d', properTime: 2 } as const;
const sizes = [400, 800, 1600];
const seeds = Array.from({ length: 10 }, (_, k) => `scaling-${k + 1}`);
const centres = [
  { t: 0, x: 0 },
  { t: 0, x: 0.25 },
  { t: 0, x: -0.25 },
  { t: 0.25, x: 0 },
  { t: -0.25, x: 0 },
];
const BAND = { low: 0.25, high: 0.55 };
const native = backendSelection().name === 'native';

describe.skipIf(!native)(`entropy scaling on 2D diamonds (statistical, seeded)${native ? '' : ' — skipped: ml-matrix backend, would take about 18 min'}`, () => {
  it('untruncated S grows like the volume; the double-truncated b lies in [0.25, 0.55] around 1/3', async () => {
    const subregions = resolveSubregions({
      region,
      subregions: { kind: 'tips', diamonds: centres.map((c) => ({ past: { t: c.t - 0.5, x: c.x }, future: { t: c.t + 0.5, x: c.x } })) },
    });
    const rules = [
      { truncation: { rule: 'none' as const }, doubleTruncation: false },
      { truncation: { rule: 'sqrtN' as const }, doubleTruncation: true },
    ];
    const entropies: StudyEntropy[] = [];
    for (const N of sizes) {
      for (const seed of seeds) {
        const cell = await computeStudyCell({ sprinkling: { region, count: N, seed }, mass: 0, subregions, rules });
        for (const e of cell.entropies) {
          entropies.push({ ...e, cellId: `${N}-${seed}`, N, elements: cell.N, seed, fraction: null, stateModesKept: 0, stateCutoff: 0 });
        }
      }
    }
    const aggregates = aggregateEntropies(entropies);
    const fits = fitAggregates(aggregates);

    const untruncated = aggregates.filter((a) => a.rule === 'none');
    for (const s of subregions) {
      const rows = untruncated.filter((a) => a.subregion === s.key);
      expect(rows.map((a) => a.N)).toEqual(sizes);
      for (let k = 1; k < rows.length; k++) expect(rows[k]!.meanS).toBeGreaterThan(rows[k - 1]!.meanS);
    }
    const volume = fits.find((f) => f.rule === 'none' && f.model === 'linear' && f.subregion === null)!;
    expect(volume.slope - 2 * volume.slopeError!).toBeGreaterThan(0);

    const perSubregion = fits.filter((f) => f.rule === 'sqrtN+double' && f.model === 'log' && f.subregion !== null);
    expect(perSubregion).toHaveLength(subregions.length);
    perSubregion.forEach((f) => expect(f.weighting).toBe('inverse-variance'));
    const b = perSubregion.reduce((sum, f) => sum + f.slope, 0) / perSubregion.length;
    expect(b).toBeGreaterThan(BAND.low);
    expect(b).toBeLessThan(BAND.high);
    // the double-truncated entropy is far below the untruncated one at every size (SSY 2014, SY 2018)
    for (const a of aggregates.filter((x) => x.rule === 'sqrtN+double')) {
      expect(a.meanS).toBeLessThan(0.25 * untruncated.find((u) => u.N === a.N && u.subregion === a.subregion)!.meanS);
    }
  }, 300_000);
});
