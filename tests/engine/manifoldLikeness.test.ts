import { describe, expect, it } from 'vitest';
import { causalMatrix } from '../../server/engine/order';
import {
  diamondOrderingFraction,
  lnGamma,
  manifoldLikeness,
  myrheimMeyerDimension,
  relationOfPoints,
} from '../../server/engine/manifoldLikeness';
import { seededUniform, sprinkle } from '../../server/engine/sprinkle';

/** Brute force, straight from the definitions: every triple tested (the reference for exact counts). */
function bruteForce(points: ArrayLike<number>, dimension: number, maxGap: number) {
  const n = points.length / dimension;
  const precedes = (i: number, j: number) => {
    const dt = points[j * dimension] - points[i * dimension];
    let space = 0;
    for (let k = 1; k < dimension; k++) space += (points[j * dimension + k] - points[i * dimension + k]) ** 2;
    return dt > 0 && dt * dt > space;
  };
  let relations = 0;
  const abundances = new Array<number>(maxGap + 1).fill(0);
  const chain = new Array<number>(n).fill(1);
  const byTime = Array.from({ length: n }, (_, i) => i).sort((a, b) => points[a * dimension] - points[b * dimension]);
  for (const j of byTime) for (const i of byTime) if (precedes(i, j)) chain[j] = Math.max(chain[j], chain[i] + 1);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (!precedes(i, j)) continue;
      relations++;
      let between = 0;
      for (let k = 0; k < n; k++) if (precedes(i, k) && precedes(k, j)) between++;
      if (between <= maxGap) abundances[between]++;
    }
  }
  return { relations, links: abundances[0], abundances, longestChain: Math.max(...chain) };
}

/** A uniform sprinkling of the 3D causal diamond |t| + r ≤ 1 by rejection from its bounding box. */
function diamond3d(count: number, seed: string): Float64Array {
  const uniform = seededUniform(seed);
  const points = new Float64Array(3 * count);
  for (let k = 0; k < count; ) {
    const t = 2 * uniform() - 1;
    const x = 2 * uniform() - 1;
    const y = 2 * uniform() - 1;
    if (Math.abs(t) + Math.hypot(x, y) > 1) continue;
    points.set([t, x, y], 3 * k++);
  }
  return points;
}

const diamond = (kind: 'diamond2d' | 'diamond4d', count: number, seed: string) =>
  sprinkle({ region: { kind, properTime: 2 }, process: 'fixed', count, seed, prng: 'arc4' }).points;

describe('gamma function and the Myrheim–Meyer relation', () => {
  it('lnGamma matches Γ(n) = (n−1)! and Γ(½) = √π (facts of the trade)', () => {
    expect(Math.exp(lnGamma(5))).toBeCloseTo(24, 10);
    expect(Math.exp(lnGamma(10))).toBeCloseTo(362880, 6);
    expect(Math.exp(lnGamma(0.5))).toBeCloseTo(Math.sqrt(Math.PI), 12);
    expect(Math.exp(lnGamma(0.25))).toBeCloseTo(3.6256099082219083, 10); // Γ(¼), from memory
  });

  it('the diamond ordering fraction is ½, 8/35, 1/10 in 2D, 3D, 4D (Myrheim 1978; Meyer 1988) and inverts', () => {
    expect(diamondOrderingFraction(2)).toBeCloseTo(0.5, 12);
    expect(diamondOrderingFraction(3)).toBeCloseTo(8 / 35, 12);
    expect(diamondOrderingFraction(4)).toBeCloseTo(0.1, 12);
    for (const d of [1.5, 2, 3, 4, 6.5]) expect(myrheimMeyerDimension(diamondOrderingFraction(d))).toBeCloseTo(d, 8);
    expect(myrheimMeyerDimension(0)).toBeNull();
  });
});

describe('exact counts against brute force', () => {
  it('2D points by the light-cone route equal the brute-force counts', () => {
    const points = diamond('diamond2d', 260, 'brute-2d');
    const got = manifoldLikeness({ kind: 'points', points, dimension: 2 }, { maxGap: 6 });
    const ref = bruteForce(points, 2, 6);
    expect(got).toMatchObject({ N: 260, relations: ref.relations, links: ref.links, longestChain: ref.longestChain, intervalAbundances: ref.abundances });
    expect(got.orderingFraction).toBeCloseTo(ref.relations / ((260 * 259) / 2), 14);
  });

  it('the relation route equals brute force in 2D, 3D and 4D, and the 2D routes agree', () => {
    const cases: [Float64Array, number][] = [
      [diamond('diamond2d', 200, 'rel-2d'), 2],
      [diamond3d(200, 'rel-3d'), 3],
      [diamond('diamond4d', 200, 'rel-4d'), 4],
    ];
    for (const [points, dimension] of cases) {
      const ref = bruteForce(points, dimension, 5);
      const viaRelation = manifoldLikeness({ kind: 'relation', causal: relationOfPoints(points, dimension) }, { maxGap: 5 });
      expect(viaRelation).toMatchObject({ relations: ref.relations, links: ref.links, longestChain: ref.longestChain, intervalAbundances: ref.abundances });
    }
    // the engine's own causal matrix gives the same relation as relationOfPoints
    const points = cases[0][0];
    expect(relationOfPoints(points, 2).words).toEqual(causalMatrix(points, 2).words);
    const light = manifoldLikeness({ kind: 'points', points, dimension: 2 });
    const relation = manifoldLikeness({ kind: 'relation', causal: causalMatrix(points, 2) });
    expect(light.intervalAbundances).toEqual(relation.intervalAbundances);
    expect(light.dimension.midpoint).toEqual(relation.dimension.midpoint);
  });
});

describe('the estimators recover the dimension of sprinkled diamonds', () => {
  // Myrheim–Meyer within its stated error (widened to 2σ, a two-sided 95% band, as common practice);
  // the midpoint scaling within 0.35 at these sizes (it has no error of its own; a finite-size bias of
  // a few tenths is expected at N of a few thousand)
  const cases: [string, Float64Array, number][] = [
    ['2D', diamond('diamond2d', 4000, 'dim-2d'), 2],
    ['3D', diamond3d(2500, 'dim-3d'), 3],
    ['4D', diamond('diamond4d', 2500, 'dim-4d'), 4],
  ];
  for (const [name, points, d] of cases) {
    it(`${name}: Myrheim–Meyer ${d} within 2σ, midpoint near ${d}`, () => {
      const result = manifoldLikeness({ kind: 'points', points, dimension: d });
      const mm = result.dimension.myrheimMeyer;
      expect(mm.error).not.toBeNull();
      expect(mm.subIntervals).toBeGreaterThanOrEqual(4);
      expect(Math.abs(mm.estimate! - d)).toBeLessThanOrEqual(2 * mm.error!);
      expect(mm.error!).toBeLessThan(0.25);
      expect(Math.abs(result.dimension.midpoint.estimate! - d)).toBeLessThan(0.35);
      console.log(name, JSON.stringify({ mm, midpoint: result.dimension.midpoint, chain: result.longestChain, N: result.N }));
    });
  }
});

describe('the stated Myrheim–Meyer error means what it says', () => {
  it('over 12 sprinklings of a 2D diamond the spread of the estimates is within a factor 2 of the mean stated error', () => {
    const runs = Array.from({ length: 12 }, (_, k) => manifoldLikeness({ kind: 'points', points: diamond('diamond2d', 1500, `spread-${k}`), dimension: 2 }).dimension.myrheimMeyer);
    const estimates = runs.map((r) => r.estimate!);
    const mean = estimates.reduce((s, d) => s + d, 0) / estimates.length;
    const spread = Math.sqrt(estimates.reduce((s, d) => s + (d - mean) ** 2, 0) / (estimates.length - 1));
    const stated = runs.reduce((s, r) => s + r.error!, 0) / runs.length;
    expect(spread / stated).toBeGreaterThan(0.5);
    expect(spread / stated).toBeLessThan(2);
    expect(Math.abs(mean - 2)).toBeLessThan(3 * (spread / Math.sqrt(estimates.length)));
  });
});
