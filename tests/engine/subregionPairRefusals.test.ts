import { describe, expect, it } from 'vitest';
import type { RegionSpec, SubregionPair, SubregionSpec } from '@shared/vacuum';
import { computeVacuum, EngineInputError, lightConeNeighbourhood, subregionPairIssue, validateVacuumRequest, type VacuumRequest } from '../../server/engine/index';
import { subregionElements } from '../../server/engine/entropy';
import { causalMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';

// Bad input of issue 15 (server/engine/README.md §15) is refused by validateVacuumRequest — which the API
// runs before it stores or queues anything — with the field at fault. The tip rule for a pair of 2D
// sub-diamonds is checked against the definition of §1 on sprinkled elements (common practice).

const diamond2d = { kind: 'diamond2d' as const, properTime: 2 };
const sprinkling = (region: RegionSpec = diamond2d) => ({ kind: 'sprinkling' as const, sprinkling: { region, process: 'fixed' as const, count: 300, seed: 'refusals' } });
const diamond = (t: number, x: number, h: number): Extract<SubregionSpec, { kind: 'diamond' }> => ({ kind: 'diamond', past: { t: t - h, x }, future: { t: t + h, x } });
const subregion = diamond(0, 0, 0.4);

function refusal(request: VacuumRequest): EngineInputError {
  try {
    validateVacuumRequest(request);
  } catch (error) {
    expect(error).toBeInstanceOf(EngineInputError);
    return error as EngineInputError;
  }
  throw new Error('the request was accepted');
}

describe('refusals of Rényi orders, pairs and the complement', () => {
  const relationSource = (() => {
    // a chain 0 ≺ 1 ≺ 2 and two elements 3, 4 unrelated to everything
    const relation = causalMatrix(Float64Array.from([0, 0, 1, 0, 2, 0, 0, 5, 0, -5]), 2);
    return { kind: 'order' as const, causal: relation.words, count: 5, dimension: 2 as const };
  })();
  const cases: { name: string; request: VacuumRequest; field: string; says: RegExp }[] = [
    { name: 'α = 0', request: { source: sprinkling(), subregion, renyi: [0] }, field: 'renyi', says: /must be > 0/ },
    { name: 'α < 0', request: { source: sprinkling(), subregion, renyi: [2, -1] }, field: 'renyi', says: /must be > 0/ },
    { name: 'nine orders', request: { source: sprinkling(), subregion, renyi: [0.5, 2, 3, 4, 5, 6, 7, 8, 'inf'] }, field: 'renyi', says: /at most 8/ },
    { name: 'Rényi orders without a subregion', request: { source: sprinkling(), renyi: [2] }, field: 'renyi', says: /need a subregion/ },
    { name: 'the complement without a subregion', request: { source: sprinkling(), complement: true }, field: 'complement', says: /needs a subregion/ },
    { name: 'overlapping 2D sub-diamonds', request: { source: sprinkling(), mutualInformation: { a: diamond(0, -0.1, 0.2), b: diamond(0.05, 0.15, 0.2) } }, field: 'mutualInformation.b', says: /overlap/ },
    { name: 'causally related 2D sub-diamonds', request: { source: sprinkling(), mutualInformation: { a: diamond(-0.5, 0, 0.2), b: diamond(0.5, 0.1, 0.2) } }, field: 'mutualInformation.b', says: /causally related \(part of A lies in the past of B\)/ },
    {
      name: 'sub-diamonds overlapping round the cylinder',
      request: { source: sprinkling({ kind: 'cylinder2d', properTime: 2, circumference: 1.5 }), mutualInformation: { a: diamond(0, 0.7, 0.2), b: diamond(0, -0.65, 0.2) } },
      field: 'mutualInformation.b',
      says: /overlap/,
    },
    {
      name: '4D sub-diamonds with a tip of one before the other’s',
      request: {
        source: sprinkling({ kind: 'diamond4d', properTime: 2 }),
        mutualInformation: {
          a: { kind: 'diamond', past: { t: -0.3, x: -0.15, y: 0, z: 0 }, future: { t: 0.3, x: -0.15, y: 0, z: 0 } },
          b: { kind: 'diamond', past: { t: -0.3, x: 0.15, y: 0, z: 0 }, future: { t: 0.3, x: 0.15, y: 0, z: 0 } },
        },
      },
      field: 'mutualInformation.b',
      says: /overlap or are causally related/,
    },
    { name: 'a tip of A outside the region', request: { source: sprinkling(), mutualInformation: { a: diamond(0.5, -0.5, 0.2), b: diamond(0, 0.4, 0.2) } }, field: 'mutualInformation.a.future', says: /sub-diamond A: .*outside/ },
    { name: 'a sub-diamond and a list', request: { source: sprinkling(), mutualInformation: { a: diamond(0, -0.4, 0.2), b: { kind: 'elements', indices: [1, 2] } } }, field: 'mutualInformation.b', says: /both be sub-diamonds or both element lists/ },
    { name: 'lists sharing an element', request: { source: sprinkling(), mutualInformation: { a: { kind: 'elements', indices: [1, 2, 3] }, b: { kind: 'elements', indices: [7, 3] } } }, field: 'mutualInformation.b.indices', says: /share 1 element/ },
    { name: 'a label beyond N', request: { source: sprinkling(), mutualInformation: { a: { kind: 'elements', indices: [1, 400] }, b: { kind: 'elements', indices: [7, 8] } } }, field: 'mutualInformation.a.indices', says: /element 400 does not exist/ },
    { name: 'a sub-diamond on a relation list', request: { source: relationSource, mutualInformation: { a: diamond(0, -0.4, 0.2), b: diamond(0, 0.4, 0.2) } }, field: 'mutualInformation.a', says: /give subregion A as a list of elements/ },
    { name: 'related lists on a relation list', request: { source: relationSource, mutualInformation: { a: { kind: 'elements', indices: [0, 3] }, b: { kind: 'elements', indices: [2, 4] } } }, field: 'mutualInformation.b', says: /causally related/ },
    {
      name: 'a sub-diamond with fewer than 2 of the given points',
      request: { source: { kind: 'points', points: [0, 0, 0.1, 0.5, -0.1, 0.55], dimension: 2, region: diamond2d }, mutualInformation: { a: diamond(0, -0.5, 0.1), b: diamond(0, 0.5, 0.2) } },
      field: 'mutualInformation.a',
      says: /holds 0 of the 3 elements/,
    },
  ];
  it.each(cases)('$name: refused with field $field', ({ request, field, says }) => {
    const error = refusal(request);
    expect(error.field).toBe(field);
    expect(error.message).toMatch(says);
  });

  it('accepts a spacelike pair, unrelated lists on a relation list and a pair across the cylinder seam that does not meet; refuses related lists in either order', () => {
    expect(() => validateVacuumRequest({ source: sprinkling(), mutualInformation: { a: diamond(0, -0.4, 0.2), b: diamond(0, 0.4, 0.2) } })).not.toThrow();
    expect(() => validateVacuumRequest({ source: relationSource, mutualInformation: { a: { kind: 'elements', indices: [0, 3] }, b: { kind: 'elements', indices: [4, 1] } } })).toThrow(/causally related/);
    expect(() => validateVacuumRequest({ source: relationSource, mutualInformation: { a: { kind: 'elements', indices: [0, 1] }, b: { kind: 'elements', indices: [3, 4] } } })).not.toThrow();
    const cylinder = sprinkling({ kind: 'cylinder2d', properTime: 2, circumference: 1.5 });
    expect(() => validateVacuumRequest({ source: cylinder, mutualInformation: { a: diamond(0, 0.6, 0.1), b: diamond(0, -0.6, 0.1) } })).not.toThrow();
  });

  it('computeVacuum refuses before its first stage (nothing sprinkled, no progress)', async () => {
    const progress: string[] = [];
    await expect(
      computeVacuum({ source: sprinkling(), mutualInformation: { a: diamond(-0.5, 0, 0.2), b: diamond(0.5, 0, 0.2) } }, { onProgress: (stage) => progress.push(stage) }),
    ).rejects.toMatchObject({ field: 'mutualInformation.b' });
    expect(progress).toEqual([]);
  });

  it('refuses a complement too small for an entropy after the order, before the spectrum', async () => {
    const progress: string[] = [];
    await expect(
      computeVacuum({ source: sprinkling(), subregion: diamond(0, 0, 0.999), complement: true, engine: 'dense' }, { onProgress: (stage, f) => f === 1 && progress.push(stage) }),
    ).rejects.toMatchObject({ field: 'complement' });
    expect(progress).toEqual(['sprinkle']);
  });
});

describe('the tip rule for 2D pairs against sprinkled elements', () => {
  it('never calls spacelike what elements show overlapping or related, and calls shared elements an overlap', () => {
    const s = sprinkle({ region: diamond2d, process: 'fixed', count: 4000, seed: 'pair-tips', prng: 'arc4' });
    let seen = { overlap: 0, related: 0, spacelike: 0 };
    let state = 12345;
    const random = () => ((state = (state * 1103515245 + 12345) % 2147483648) / 2147483648);
    for (let trial = 0; trial < 300; trial++) {
      const pick = (): Extract<SubregionSpec, { kind: 'diamond' }> => diamond(0.8 * random() - 0.4, 0.8 * random() - 0.4, 0.05 + 0.2 * random());
      const pair: SubregionPair = { a: pick(), b: pick() };
      const issue = subregionPairIssue(pair, 2, diamond2d);
      if (issue && !/overlap|related/.test(issue.message)) continue; // a tip outside the region
      const a = subregionElements(pair.a, s.points, 2);
      const b = subregionElements(pair.b, s.points, 2);
      const inA = new Set(a);
      const shared = Array.from(b).some((e) => inA.has(e));
      const aNeighbourhood = lightConeNeighbourhood(s.points, a);
      const related = Array.from(b).some((e) => aNeighbourhood.relatedToSet(e));
      const verdict = issue === null ? 'spacelike' : /overlap/.test(issue.message) ? 'overlap' : 'related';
      if (shared) expect(verdict).toBe('overlap');
      else if (related) expect(verdict).not.toBe('spacelike');
      if (verdict === 'spacelike') expect(shared || related).toBe(false);
      seen = { ...seen, [verdict]: seen[verdict] + 1 };
    }
    // every verdict occurs often enough to have been tested
    expect(Math.min(seen.overlap, seen.related, seen.spacelike)).toBeGreaterThan(20);
  });
});
