import { describe, expect, it } from 'vitest';
import type { SprinkledStudyRequest } from '@shared/studies';
import { sprinkledStudyRequestSchema } from '@shared/studies';
import { diamondVolume, expectedSubregionElements, planCells, resolveImportedSubregions, resolveSubregions, StudyPlanError, type PlannedCausalSet } from '../../server/studies/plan';

const request = (over: Partial<Record<keyof SprinkledStudyRequest, unknown>>): SprinkledStudyRequest =>
  sprinkledStudyRequestSchema.parse({
    source: 'sprinkled',
    counts: [400],
    seeds: ['a'],
    rules: [{ truncation: { rule: 'none' } }],
    subregions: { kind: 'pairs', sizes: [0.2], separations: [0.1] },
    ...over,
  });

const planError = (fn: () => unknown): StudyPlanError => {
  try {
    fn();
  } catch (error) {
    if (error instanceof StudyPlanError) return error;
    throw error;
  }
  throw new Error('expected a StudyPlanError');
};

describe('pairs of sub-diamonds for the mutual information', () => {
  it('places two sub-diamonds of proper time ℓ on the central slice, a gap d between their facing corners (worked example)', () => {
    // L = 2, ℓ/T = 0.2 → ℓ = 0.4, half-width 0.2; d/T = 0.1 → d = 0.2. Facing corners at x = ∓d/2 = ∓0.1,
    // centres at ∓(ℓ + d)/2 = ∓0.3, tips at t = ∓ℓ/2 = ∓0.2; the outer corners at ∓0.5 lie inside |x| ≤ 1.
    const [pair] = resolveSubregions(request({ region: { kind: 'diamond2d', properTime: 2 } }));
    expect(pair!.key).toBe('pair l/L=0.2 d/L=0.1');
    expect(pair!.pair!.a.past.t).toBeCloseTo(-0.2, 14);
    expect(pair!.pair!.a.past.x).toBeCloseTo(-0.3, 14);
    expect(pair!.pair!.a.future.t).toBeCloseTo(0.2, 14);
    expect(pair!.pair!.a.future.x).toBeCloseTo(-0.3, 14);
    expect(pair!.pair!.b.past.x).toBeCloseTo(0.3, 14);
    // facing corners: the right corner of A at x_A + ℓ/2 and the left corner of B at x_B − ℓ/2, d apart
    expect(pair!.pair!.b.past.x - 0.2 - (pair!.pair!.a.past.x + 0.2)).toBeCloseTo(0.2, 14);
    // each holds N ℓ²/L² = 400 × 0.04 = 16 elements on average (volume ratio (ℓ²/2)/(L²/2))
    expect(expectedSubregionElements({ region: { kind: 'diamond2d', properTime: 2 } }, pair!, 400)).toBeCloseTo(16, 12);
  });

  it('keeps the pair symmetric about a boosted diamond and orthogonal to its axis', () => {
    // tips (0,0) → (2, 1): axis u = (2, 1)/√3, across ê = (1, 2)/√3 (Minkowski-orthogonal: 2·1 − 1·2 = 0)
    const region = { kind: 'diamond2d' as const, past: { t: 0, x: 0 }, future: { t: 2, x: 1 } };
    const [pair] = resolveSubregions(request({ region }));
    const { a, b } = pair!.pair!;
    const centre = (d: typeof a) => ({ t: (d.past.t + d.future.t) / 2, x: (d.past.x + d.future.x) / 2 });
    const ca = centre(a);
    const cb = centre(b);
    expect((ca.t + cb.t) / 2).toBeCloseTo(1, 12);
    expect((ca.x + cb.x) / 2).toBeCloseTo(0.5, 12);
    // proper time of each: √(Δt² − Δx²) = ℓ = 0.2 √3
    expect(Math.sqrt((a.future.t - a.past.t) ** 2 - (a.future.x - a.past.x) ** 2)).toBeCloseTo(0.2 * Math.sqrt(3), 12);
    // the line between the centres is orthogonal to the axis (2, 1)
    expect(2 * (cb.t - ca.t) - 1 * (cb.x - ca.x)).toBeCloseTo(0, 12);
    expect(diamondVolume(a)).toBeCloseTo(diamondVolume(b), 12);
  });

  it('places the 4D pair along x', () => {
    const [pair] = resolveSubregions(request({ region: { kind: 'diamond4d', properTime: 2 }, counts: [2000] }));
    expect(pair!.pair!.a.past).toMatchObject({ t: -0.2, y: 0, z: 0 });
    expect(pair!.pair!.b.past.x).toBeCloseTo(0.3, 14);
  });

  it('refuses pairs that do not fit, naming the separation', () => {
    // 2ℓ + d = 0.8 + 0.3 = 1.1 L > L
    const error = planError(() => resolveSubregions(request({ subregions: { kind: 'pairs', sizes: [0.4], separations: [0.1, 0.3] } })));
    expect(error.path).toBe('subregions.separations.1');
    expect(error.message).toMatch(/does not fit/);
  });

  it('refuses on the cylinder a pair whose gap the other way round is below d', () => {
    // C = 1.5, ℓ = 0.4, d = 0.4: the other gap is 1.5 − 0.8 − 0.4 = 0.3 < d
    const region = { kind: 'cylinder2d' as const, properTime: 2, circumference: 1.5 };
    const error = planError(() => resolveSubregions(request({ region, subregions: { kind: 'pairs', sizes: [0.2], separations: [0.05, 0.2] } })));
    expect(error.path).toBe('subregions.separations.1');
    expect(error.message).toMatch(/other way round/);
    expect(resolveSubregions(request({ region, subregions: { kind: 'pairs', sizes: [0.2], separations: [0.05] } }))).toHaveLength(1);
  });

  it('refuses a slab and pairs expected to hold too few elements, naming the size', () => {
    const slab = planError(() => resolveSubregions(request({ region: { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 4 } })));
    expect(slab.path).toBe('subregions.kind');
    // ℓ/T = 0.1 at N = 400: 400 × 0.01 = 4 elements < 8
    const small = request({ subregions: { kind: 'pairs', sizes: [0.3, 0.1], separations: [0.05] } });
    const error = planError(() => planCells(small, resolveSubregions(small)));
    expect(error.path).toBe('subregions.sizes.1');
    expect(error.message).toMatch(/about 4\.0 elements at N = 400/);
  });

  it('imported sets: pairs where concentric sub-diamonds work, refused with the same words elsewhere', () => {
    const set = (name: string, region: PlannedCausalSet['reference']['region']): PlannedCausalSet => ({
      reference: { id: name, name, fileName: `${name}.csv`, checksum: 'x', kind: 'coordinates', dimension: 2, N: 100, region, density: null },
      points: new Float64Array(200),
    });
    const pairs = { subregions: { kind: 'pairs' as const, sizes: [0.2], separations: [0.1] } };
    const common = resolveImportedSubregions(pairs, [set('a', { kind: 'diamond2d', properTime: 2 }), set('b', { kind: 'diamond2d', properTime: 2 })]);
    expect(common.map((s) => s.key)).toEqual(['pair l/L=0.2 d/L=0.1']);
    const mixed = planError(() => resolveImportedSubregions(pairs, [set('a', { kind: 'diamond2d', properTime: 2 }), set('b', { kind: 'diamond2d', properTime: 3 })]));
    expect(mixed.message).toBe('pairs of sub-diamonds need every causal set imported with the same region; give tips or element lists');
  });
});
