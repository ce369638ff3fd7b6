import { describe, expect, it } from 'vitest';
import { causalMatrix, linkMatrix } from '../../server/engine/order';
import { makeRegion } from '../../server/engine/regions';
import { poissonVariate, seededUniform, sprinkle } from '../../server/engine/sprinkle';

function bruteForceLinks(n: number, related: (i: number, j: number) => boolean): boolean[][] {
  // definition of server/engine/README.md §1: i ≺ j with no k such that i ≺ k ≺ j
  return Array.from({ length: n }, (_, i) =>
    Array.from({ length: n }, (_, j) => {
      if (!related(i, j)) return false;
      for (let k = 0; k < n; k++) if (related(i, k) && related(k, j)) return false;
      return true;
    }),
  );
}

describe('causal order and links', () => {
  for (const [label, region] of [
    ['2D diamond', { kind: 'diamond2d', properTime: 2 }],
    ['4D diamond', { kind: 'diamond4d', properTime: 2 }],
  ] as const) {
    it(`${label}: C is the light-cone relation and L matches a brute-force triple loop`, () => {
      const s = sprinkle({ region, process: 'fixed', count: 160, seed: label, prng: 'arc4' });
      const d = s.dimension;
      const p = s.points;
      const light = (i: number, j: number) => {
        // server/engine/README.md §1: i ≺ j iff t_j − t_i > |x⃗_j − x⃗_i|
        let r2 = 0;
        for (let k = 1; k < d; k++) r2 += (p[j * d + k] - p[i * d + k]) ** 2;
        return p[j * d] - p[i * d] > Math.sqrt(r2);
      };
      const c = causalMatrix(p, d);
      const links = linkMatrix(c);
      const expected = bruteForceLinks(s.count, light);
      let linkCount = 0;
      for (let i = 0; i < s.count; i++) {
        for (let j = 0; j < s.count; j++) {
          expect(c.has(i, j)).toBe(light(i, j));
          expect(links.has(i, j)).toBe(expected[i][j]);
          if (expected[i][j]) linkCount++;
        }
      }
      expect(links.count()).toBe(linkCount);
      expect(linkCount).toBeGreaterThan(s.count / 2);
    });
  }

  it('on the cylinder relates elements through the images x + kL, and is invariant under rotations', () => {
    // fact of the trade (common practice): on x ~ x + L, j ⪰ i iff j is in the future of some image of i
    const L = 1;
    const s = sprinkle({ region: { kind: 'cylinder2d', properTime: 1.6, circumference: L }, process: 'fixed', count: 200, seed: 'cylinder', prng: 'arc4' });
    const p = s.points;
    const c = causalMatrix(p, 2, L);
    let acrossSeam = 0;
    for (let i = 0; i < s.count; i++) {
      for (let j = 0; j < s.count; j++) {
        let viaImage = false;
        for (let k = -3; k <= 3; k++) if (j !== i && p[2 * j] - p[2 * i] > Math.abs(p[2 * j + 1] - p[2 * i + 1] + k * L)) viaImage = true;
        expect(c.has(i, j)).toBe(viaImage);
        if (viaImage && !(p[2 * j] - p[2 * i] > Math.abs(p[2 * j + 1] - p[2 * i + 1]))) acrossSeam++;
      }
    }
    expect(acrossSeam).toBeGreaterThan(100);
    // moving the seam (rotating every x by L/3 and wrapping into [−L/2, L/2)) leaves the order unchanged
    const rotated = Float64Array.from(p);
    for (let i = 0; i < s.count; i++) rotated[2 * i + 1] = ((((p[2 * i + 1] + L / 3 + L / 2) % L) + L) % L) - L / 2;
    const c2 = causalMatrix(rotated, 2, L);
    expect(Array.from(c2.words)).toEqual(Array.from(c.words));
  });
});

describe('regions and sprinkling', () => {
  it('gives the same points bit for bit from the same seed, different points from another', () => {
    const spec = { region: { kind: 'slab2d', tMin: 0, tMax: 2, xMin: -1, xMax: 1 }, process: 'poisson', count: 300, seed: 's1', prng: 'xor4096' } as const;
    const a = sprinkle(spec);
    const b = sprinkle(spec);
    expect(Buffer.from(a.points.buffer).equals(Buffer.from(b.points.buffer))).toBe(true);
    expect(a.provenance).toEqual({ seed: 's1', prng: 'seedrandom.xor4096', process: 'poisson' });
    const c = sprinkle({ ...spec, seed: 's2' });
    expect(Buffer.from(a.points.buffer).equals(Buffer.from(c.points.buffer))).toBe(false);
  });

  it('has exact volumes: τ²/2 and πτ⁴/24 (server/engine/README.md §2) and the wrapped cylinder diamond', () => {
    expect(makeRegion({ kind: 'diamond2d', properTime: 3 }).volume).toBeCloseTo(4.5, 14);
    expect(makeRegion({ kind: 'diamond2d', past: { t: 0, x: 0 }, future: { t: 2, x: 1 } }).volume).toBeCloseTo(1.5, 14); // τ² = 4 − 1
    expect(makeRegion({ kind: 'diamond4d', properTime: 2 }).volume).toBeCloseTo((Math.PI * 16) / 24, 14);
    // Monte Carlo estimate of the cylinder diamond's area when it wraps (T > L), statistical and seeded:
    // the hit fraction of the bounding box must agree with the exact area within 4 standard deviations
    const region = makeRegion({ kind: 'cylinder2d', properTime: 3, circumference: 2 });
    const uniform = seededUniform('mc-volume');
    const samples = 200_000;
    let hits = 0;
    for (let k = 0; k < samples; k++) if (region.contains([-1.5 + 3 * uniform(), -1 + 2 * uniform()])) hits++;
    const boxArea = 6;
    const fraction = region.volume / boxArea;
    expect(region.volume).toBeCloseTo(4.5 - 0.5, 14);
    expect(Math.abs(hits / samples - fraction)).toBeLessThan(4 * Math.sqrt((fraction * (1 - fraction)) / samples));
  });

  it('draws Poisson counts with mean and variance ρV (statistical, seeded)', () => {
    // Bombelli–Lee–Meyer–Sorkin 1987: N ~ Poisson(ρV); mean and variance both equal ρV
    const uniform = seededUniform('poisson-counts');
    const mean = 250;
    const draws = Array.from({ length: 2000 }, () => poissonVariate(mean, uniform));
    const m = draws.reduce((a, b) => a + b, 0) / draws.length;
    const v = draws.reduce((a, b) => a + (b - m) ** 2, 0) / (draws.length - 1);
    expect(Math.abs(m - mean)).toBeLessThan(4 * Math.sqrt(mean / draws.length));
    expect(Math.abs(v / mean - 1)).toBeLessThan(0.15);
  });

  it('puts every sprinkled point inside its region', () => {
    for (const region of [
      { kind: 'diamond2d', past: { t: -1, x: 0.5 }, future: { t: 1, x: 0.2 } },
      { kind: 'cylinder2d', properTime: 1, circumference: 3 },
      { kind: 'diamond4d', properTime: 1 },
    ] as const) {
      const s = sprinkle({ region, process: 'fixed', count: 500, seed: 'inside', prng: 'arc4' });
      const r = makeRegion(region);
      for (let i = 0; i < s.count; i++) expect(r.contains(s.points.subarray(i * s.dimension, (i + 1) * s.dimension))).toBe(true);
      expect(s.density).toBeCloseTo(500 / r.volume, 12);
    }
  });
});
