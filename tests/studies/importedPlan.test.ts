import { describe, expect, it } from 'vitest';
import { createStudyRequestSchema, type StudyCausalSet } from '@shared/studies';
import { sprinkle } from '../../server/engine/sprinkle';
import { planImportedCells, resolveImportedSubregions, resolveSubregions, StudyPlanError, type PlannedCausalSet } from '../../server/studies/plan';

/** Planning a study over imported causal sets (no database): subregions, cell order and the checks. */
const region = { kind: 'diamond2d', properTime: 2 } as const;
const set = (id: string, N: number, extra: Partial<StudyCausalSet> = {}, withPoints = true): PlannedCausalSet => ({
  reference: { id, name: `set ${id}`, fileName: `${id}.csv`, checksum: 'c'.repeat(64), kind: 'coordinates', dimension: 2, N, region, density: null, ...extra },
  points: withPoints ? sprinkle({ region, process: 'fixed', count: N, seed: id, prng: 'arc4' }).points : null,
});

describe('imported study requests', () => {
  it('default to sprinklings when no source is given, and keep the two shapes apart', () => {
    const old = createStudyRequestSchema.parse({ counts: [100], seeds: ['a'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'none' } }] });
    expect(old.source).toBe('sprinkled');
    const imported = { source: 'imported', causalSetIds: ['3f2b8c1e-1111-4222-8333-444455556666'], subregions: { kind: 'concentric', fractions: [0.5] }, rules: [{ truncation: { rule: 'none' } }] };
    expect(createStudyRequestSchema.parse(imported).source).toBe('imported');
    expect(createStudyRequestSchema.safeParse({ ...imported, seeds: ['a'] }).success).toBe(false);
    const twice = createStudyRequestSchema.safeParse({ ...imported, causalSetIds: [imported.causalSetIds[0], imported.causalSetIds[0]!.toUpperCase()] });
    expect(twice.success).toBe(false);
  });
});

describe('resolveImportedSubregions and planImportedCells', () => {
  it('gives the concentric sub-diamonds of the shared region, the same as a sprinkled study of that region', () => {
    const subregions = { kind: 'concentric' as const, fractions: [0.5, 0.8] };
    expect(resolveImportedSubregions({ subregions }, [set('a', 100), set('b', 60)])).toEqual(resolveSubregions({ region, subregions }));
  });

  it('orders the cells by N, keeping the order picked within an N; the seed is the set id', () => {
    const sets = [set('a', 100), set('b', 60), set('c', 100), set('d', 60)];
    const subregions = resolveImportedSubregions({ subregions: { kind: 'concentric', fractions: [0.6] } }, sets);
    expect(planImportedCells(sets, subregions).map((c) => [c.position, c.count, c.seed])).toEqual([
      [0, 60, 'b'],
      [1, 60, 'd'],
      [2, 100, 'a'],
      [3, 100, 'c'],
    ]);
  });

  it('refuses concentric sub-diamonds without one common region, and diamonds on relation lists', () => {
    const concentric = { kind: 'concentric' as const, fractions: [0.5] };
    const other = set('b', 80, { region: { kind: 'diamond2d', properTime: 3 } });
    expect(() => resolveImportedSubregions({ subregions: concentric }, [set('a', 80), other])).toThrow(/same region/);
    expect(() => resolveImportedSubregions({ subregions: concentric }, [set('a', 80, { region: null, density: 40 })])).toThrow(/density only/);
    const relations = set('r', 80, { kind: 'relations', region: null }, false);
    expect(() => resolveImportedSubregions({ subregions: concentric }, [relations])).toThrow(StudyPlanError);
    const lists = resolveImportedSubregions({ subregions: { kind: 'elements', lists: [{ indices: [5, 1, 3] }] } }, [relations]);
    expect(lists).toEqual([{ key: 'e1', label: 'elements 1', fraction: null, past: null, future: null, elements: [1, 3, 5] }]);
  });

  it('checks element labels against the smallest set and diamond sizes against the points of every set', () => {
    const sets = [set('a', 100), set('b', 40)];
    expect(() => resolveImportedSubregions({ subregions: { kind: 'elements', lists: [{ indices: [0, 39] }, { indices: [0, 40] }] } }, sets)).toThrow(
      /element 40 does not exist in "set b", which has 40 elements/,
    );
    const small = resolveImportedSubregions({ subregions: { kind: 'concentric', fractions: [0.2] } }, sets);
    expect(() => planImportedCells(sets, small)).toThrow(/of "set b" \(N = 40\); at least 8/);
  });

  it('takes tips on sets without a region, checking only the dimension and the light cone', () => {
    const free = [set('a', 80, { region: null, density: 40 })];
    const good = resolveImportedSubregions({ subregions: { kind: 'tips', diamonds: [{ past: { t: -0.6, x: 0 }, future: { t: 0.6, x: 0 } }] } }, free);
    expect(good[0]).toMatchObject({ key: 'd1', past: { t: -0.6, x: 0 } });
    expect(() => resolveImportedSubregions({ subregions: { kind: 'tips', diamonds: [{ past: { t: 0, x: 0 }, future: { t: 0.1, x: 1 } }] } }, free)).toThrow(/light cone/);
  });
});
