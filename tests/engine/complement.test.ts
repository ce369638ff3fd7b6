import { beforeAll, describe, expect, it } from 'vitest';
import type { SubregionSpec } from '@shared/vacuum';
import { causalComplement, computeVacuum, lightConeNeighbourhood, relationNeighbourhood, type VacuumResult } from '../../server/engine/index';
import { subregionElements } from '../../server/engine/entropy';
import { causalMatrix } from '../../server/engine/order';
import { precedes } from '../../server/engine/regions';
import { sprinkle } from '../../server/engine/sprinkle';
import { diamond300Points, diamond300Reference } from '../support/diamond300';
import { numpySubregionEntropies } from './numpySubregionReference';

// The complement check (server/engine/README.md §15): the causal complement O′ of a subregion O — the
// elements outside O unrelated to every element of O — and S_O′ beside S_O. Outside references: the
// independent numpy reference of tests/engine/numpySubregionReference.ts (its own O′ from C, its own S),
// and a brute-force O(N·n) loop over the definition of §1 (common practice for a fast set operation).

/** O′ by the definition: every element outside O tested against every element of O. */
function bruteForceComplement(points: Float64Array, dimension: 2 | 4, elements: Int32Array, periodX?: number): number[] {
  const inside = new Set(elements);
  const out: number[] = [];
  for (let e = 0; e < points.length / dimension; e++) {
    if (inside.has(e)) continue;
    if (!Array.from(elements).some((o) => precedes(points, dimension, o, e, periodX) || precedes(points, dimension, e, o, periodX))) out.push(e);
  }
  return out;
}

describe('causal complement on diamond300 against numpy', () => {
  const points = diamond300Points();
  const ref = diamond300Reference<{ N: number; n_sub: number }>();
  const region = { kind: 'diamond2d' as const, properTime: 2 * Math.SQRT2 };
  // off-centre, so the complement's two wedges differ in size
  const subregion: SubregionSpec = { kind: 'diamond', past: { t: -0.6, x: 0.15 }, future: { t: 0.55, x: 0.15 } };
  const cases = [
    { name: 'untruncated', truncation: { rule: 'none' as const }, doubleTruncation: false, stateCut: 0, tolerance: 1e-7 },
    { name: 'double truncated', truncation: { rule: 'sqrtN' as const }, doubleTruncation: true, stateCut: Math.sqrt(ref.N) / (4 * Math.PI), tolerance: 1e-9 },
  ];
  describe.each(cases)('$name', (c) => {
    let result: VacuumResult;
    let numpy: ReturnType<typeof numpySubregionEntropies>;
    beforeAll(async () => {
      result = await computeVacuum({
        source: { kind: 'points', points, dimension: 2, region },
        truncation: c.truncation,
        doubleTruncation: c.doubleTruncation,
        subregion,
        complement: true,
        engine: 'dense',
      });
      const elements = result.entropy!.elements;
      numpy = numpySubregionEntropies({ points, stateCut: c.stateCut, double: c.doubleTruncation, sets: [elements], complementOf: elements });
    }, 120_000);

    it('finds the same O′ as numpy and its entropy, with difference S_O′ − S_O', () => {
      const complement = result.complement!;
      expect(Array.from(complement.elements)).toEqual(numpy.complement);
      expect(complement.n).toBeGreaterThanOrEqual(40);
      const o = numpy.sets[0];
      const oPrime = numpy.complementEntropy;
      expect(Math.abs(result.entropy!.S / o!.S - 1)).toBeLessThan(c.tolerance);
      expect(Math.abs(complement.S / oPrime!.S - 1)).toBeLessThan(c.tolerance);
      expect(complement.modesKept).toBe(oPrime!.kept);
      expect(Math.abs(complement.difference - (oPrime!.S - o!.S))).toBeLessThan(c.tolerance * (o!.S + oPrime!.S));
    });
  });
});

describe('causal complement: the fast sets against the definition', () => {
  const cases = [
    { name: '2D diamond', region: { kind: 'diamond2d' as const, properTime: 2 }, dimension: 2 as const, tips: [[-0.5, 0.2], [0.3, 0.1]] },
    { name: 'cylinder, sub-diamond across x = ±L/2', region: { kind: 'cylinder2d' as const, properTime: 2, circumference: 1.5 }, dimension: 2 as const, tips: [[-0.3, 0.7], [0.3, 0.7]] },
    { name: '4D diamond', region: { kind: 'diamond4d' as const, properTime: 2 }, dimension: 4 as const, tips: [[-0.4, 0.1, 0, 0.1], [0.4, 0.1, 0, 0.1]] },
  ];
  it.each(cases)('$name: bit rows (and light cones in flat 2D) give the brute-force O′', ({ region, dimension, tips }) => {
    const s = sprinkle({ region, process: 'fixed', count: 700, seed: `complement-${region.kind}`, prng: 'arc4' });
    const periodX = 'circumference' in region ? region.circumference : undefined;
    const event = (c: number[]) => (dimension === 4 ? { t: c[0]!, x: c[1]!, y: c[2]!, z: c[3]! } : { t: c[0]!, x: c[1]! });
    const elements = subregionElements({ kind: 'diamond', past: event(tips[0]!), future: event(tips[1]!) } as SubregionSpec, s.points, dimension, periodX);
    expect(elements.length).toBeGreaterThan(20);
    const expected = bruteForceComplement(s.points, dimension, elements, periodX);
    expect(expected.length).toBeGreaterThan(20);
    const relation = causalMatrix(s.points, dimension, periodX);
    expect(Array.from(causalComplement(relationNeighbourhood(relation, elements), elements, s.count))).toEqual(expected);
    if (dimension === 2 && periodX === undefined) {
      expect(Array.from(causalComplement(lightConeNeighbourhood(s.points, elements), elements, s.count))).toEqual(expected);
    }
  });

  it('the structured engine reports the dense O′ and entropies (N = 1000)', async () => {
    const request = {
      source: { kind: 'sprinkling' as const, sprinkling: { region: { kind: 'diamond2d' as const, properTime: 2 }, process: 'fixed' as const, count: 1000, seed: 'complement-structured', prng: 'arc4' as const } },
      truncation: { rule: 'sqrtN' as const },
      doubleTruncation: true,
      subregion: { kind: 'diamond' as const, past: { t: -0.4, x: -0.1 }, future: { t: 0.45, x: -0.1 } },
      complement: true,
    };
    const dense = await computeVacuum({ ...request, engine: 'dense' });
    const structured = await computeVacuum({ ...request, engine: 'structured' });
    expect(Array.from(structured.complement!.elements)).toEqual(Array.from(dense.complement!.elements));
    expect(Math.abs(structured.complement!.S / dense.complement!.S - 1)).toBeLessThan(1e-6);
    expect(Math.abs(structured.complement!.difference - dense.complement!.difference)).toBeLessThan(1e-6 * dense.complement!.S);
  }, 120_000);
});
